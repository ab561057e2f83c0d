/**
 * The analysis pipeline: drive log in, result JSON out (docs/architecture.md §4; method and defaults in
 * docs/signal-computation.md). Pure computation; errors come back as values.
 */
import { resolveOptions, type AnalysisOptions } from "./analysis-options.ts";
import { RPM_PER_RAD_S } from "./firing-order.ts";
import { findResonance, gearboxNoiseFloor, isolationCurve } from "./isolation.ts";
import { orderBin, orderCurve, orderMap, round } from "./order-curves.ts";
import { chooseAngleGrid, integrateAngle, MAX_SAMPLES_PER_REV } from "./angle-grid.ts";
import { butterworthLowpass4, filtfilt } from "./lowpass.ts";
import { trackBlocks, type TrackedBlocks } from "./order-tracking.ts";
import { rattleCheck } from "./rattle.ts";
import { analysisResultSchema, type AnalysisResult } from "./result-schema.ts";
import {
  sectionSegments,
  sectionSpeedTrace,
  skippedWarnings,
  trackSections,
} from "./section-analysis.ts";
import { sourceBlock } from "./source-block.ts";
import { pickSpectrumSegment, timeSpectrum } from "./time-spectrum.ts";
import { fitTwoMassModel } from "./two-mass-model.ts";
import { transientResult } from "./transient-analysis.ts";
import { countText, plural } from "../base/plural.ts";
import type { DriveLog, Outcome, SignalIssue } from "./types.ts";

export type AnalysisStage = "track" | "spectra" | "results";

function fail(
  code: string,
  message: string,
  warnings: SignalIssue[] = [],
): Outcome<AnalysisResult> {
  return { ok: false, error: { code, message }, warnings };
}

function isPositive(x: unknown): x is number {
  return typeof x === "number" && Number.isFinite(x) && x > 0;
}

/** Value at quantile p (0…1) of up to ~100 000 evenly strided samples of x. */
function quantile(x: Float64Array, p: number): number {
  const stride = Math.max(1, Math.floor(x.length / 100_000));
  const s: number[] = [];
  for (let i = 0; i < x.length; i += stride) s.push(x[i]!);
  s.sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(p * s.length))] ?? 0;
}

/** Index of the first sample with a non-finite time or speed, or −1. */
function firstNonFinite(log: DriveLog): number {
  const { timeS, crankRadS, gearboxRadS } = log;
  for (let i = 0; i < timeS.length; i++) {
    // x − x is NaN exactly for NaN and ±Infinity.
    if (
      timeS[i]! - timeS[i]! !== 0 ||
      crankRadS[i]! - crankRadS[i]! !== 0 ||
      gearboxRadS[i]! - gearboxRadS[i]! !== 0
    )
      return i;
  }
  return -1;
}

/**
 * Order-tracks a drive log and derives everything the result document holds (method step by
 * step in docs/signal-computation.md; computed order tracking after Fyfe & Munck 1997).
 *
 * In: `log` with time in s (ascending) and crank and gearbox-input angular velocity in rad/s,
 * at least two samples, sampling rate in Hz. `options` (analysis-options.ts, all optional):
 * cylinders z (default 4, 1–24), stroke 4 or 2 (default 4), firingOrder override in orders per
 * crank revolution (default z/2 or z), samplesPerRev (default chosen per block so nothing
 * aliases), revsPerBlock R (default 8, order resolution 1/R), overlap (default 0.5), binRpm
 * (default 50 rpm), rattleLimitRadS2 (default 500 rad/s²), extra orders. `onProgress` gets the
 * stage (track, spectra, results) and the fraction 0–1 done.
 *
 * Out: the AnalysisResult checked against analysisResultSchema: isolation in dB at the firing
 * order per rpm bin (positive = attenuation), order curves and map as 0-peak amplitudes in rpm,
 * damper resonance in rpm, two-mass model fit in Hz, segments, idle rattle check in rad/s²,
 * time-domain spectrum, speed trace; warnings as { code, message }. Bad options or data come
 * back as { ok: false, error } with a code (invalid_option, no_data, sample_rate_too_low,
 * too_few_revolutions, …), never a throw.
 */
export function analyseDriveLog(
  log: DriveLog,
  options: AnalysisOptions = {},
  onProgress?: (stage: AnalysisStage, fraction: number) => void,
): Outcome<AnalysisResult> {
  const o = options;
  const resolved = resolveOptions(o);
  if (!resolved.ok) return fail("invalid_option", resolved.message);
  const { cylinders, stroke, firingOrder: q, orders, topOrder } = resolved.value;
  const { revsPerBlock: R, overlap, binRpm, rattleLimitRadS2: limit } = resolved.value;
  const withTransients = resolved.value.transients;

  const n = log.timeS.length;
  if (n < 2 || log.crankRadS.length !== n || log.gearboxRadS.length !== n)
    return fail(
      "no_data",
      "the drive log has fewer than two samples or channels of different lengths",
    );
  if (!isPositive(log.sampleRateHz))
    return fail("bad_sample_rate", `the sampling rate must be positive, got ${log.sampleRateHz}`);
  const bad = firstNonFinite(log);
  if (bad >= 0)
    return fail(
      "non_finite_value",
      `a speed or time value is not a finite number at sample ${bad + 1}`,
    );
  const warnings: SignalIssue[] = [];
  onProgress?.("track", 0);
  const fs = log.sampleRateHz;
  const maxRadS = quantile(log.crankRadS, 0.999);
  if (!(maxRadS > 0))
    return fail(
      "engine_not_running",
      "the crank speed never rises above zero; there is nothing to order-track",
    );
  // Sampling theorem: order q at shaft rate f needs fs > 2·q·f, so at one sample per crank
  // revolution or fewer not even order 0.5 can be read. Checked before tracking: the blocks
  // cover every revolution however few the samples (two rows 10^7 s apart took minutes and GBs).
  const maxRevPerS = maxRadS / (2 * Math.PI);
  if (!(fs > maxRevPerS))
    return fail(
      "sample_rate_too_low",
      `the sampling rate ${fs.toPrecision(3)} Hz is not above one sample per crank revolution (${maxRevPerS.toPrecision(3)} rev/s at ${(maxRadS * RPM_PER_RAD_S).toFixed(0)} rpm), so no engine order can be read; check the time column and its unit`,
    );
  const grid = chooseAngleGrid({
    sampleRateHz: fs,
    maxRadS,
    topOrder,
    samplesPerRev: o.samplesPerRev,
  });
  const topHz = (topOrder * maxRadS) / (2 * Math.PI);
  if (topHz > 0.45 * fs) {
    warnings.push({
      code: "sample_rate_low_for_top_order",
      message: `order ${topOrder} reaches ${topHz.toFixed(0)} Hz at ${(maxRadS * RPM_PER_RAD_S).toFixed(0)} rpm, near or above half the ${fs.toFixed(0)} Hz sampling rate; its amplitudes there are unreliable`,
    });
  }
  const filters = grid.lowPassHz !== null ? butterworthLowpass4(grid.lowPassHz, fs) : [];
  const trackArgs = {
    grid,
    revsPerBlock: R,
    overlap,
    topBin: Math.ceil(topOrder * R) + 2,
    // The block twist |C − G| at the firing order (order-tracking.ts), for result.twist.
    ...(withTransients ? { firingBin: orderBin(q, R) } : {}),
  };
  let tracked: TrackedBlocks;
  let wholeAngle: Float64Array | undefined; // kept for the transients (one section only)
  if (!log.sections || log.sections.length < 2) {
    const crank = filters.length ? filtfilt(log.crankRadS, filters) : log.crankRadS;
    onProgress?.("track", 0.4);
    const gearbox = filters.length ? filtfilt(log.gearboxRadS, filters) : log.gearboxRadS;
    onProgress?.("track", 0.8);
    const angle = integrateAngle(log.timeS, log.crankRadS);
    if (withTransients) wholeAngle = angle;
    onProgress?.("track", 1);
    tracked = trackBlocks({
      timeS: log.timeS,
      angleRad: angle,
      crankRadS: crank,
      gearboxRadS: gearbox,
      ...trackArgs,
      onProgress: (f) => onProgress?.("spectra", f),
    });
  } else {
    // A log split at gaps too long to repair: each section on its own, no block across a gap.
    onProgress?.("track", 1);
    const bySection = trackSections(log, filters, trackArgs, (f) => onProgress?.("spectra", f));
    warnings.push(...skippedWarnings(bySection.skipped, R));
    if (!bySection.tracked)
      return fail(
        "too_few_revolutions",
        `no section of the log holds ${R} crank revolutions (one analysis block) between its gaps`,
        warnings,
      );
    tracked = bySection.tracked;
  }
  onProgress?.("spectra", 1);
  const finest = grid.fixedSamplesPerRev ?? MAX_SAMPLES_PER_REV;
  const minValidRpm = ((2 * grid.bandHz) / finest) * 60;
  if (tracked.droppedSlowBlocks > 0) {
    warnings.push({
      code: "slow_blocks_dropped",
      message: `${countText(tracked.droppedSlowBlocks, "block")} ${plural(tracked.droppedSlowBlocks, "was", "were")} left out because the engine ran too slowly in ${plural(tracked.droppedSlowBlocks, "it", "them")} (below ${minValidRpm.toFixed(0)} rpm) for an alias-free angle grid`,
    });
  }
  if (tracked.blockCount === 0) {
    return fail(
      "too_few_revolutions",
      `the log holds no stretch of ${R} crank revolutions (one analysis block) running above ${minValidRpm.toFixed(0)} rpm`,
      warnings,
    );
  }

  onProgress?.("results", 0);
  const segments = sectionSegments(log);
  // Transients: fast spans measured by the order filter, their blocks left out of the curve.
  const part = withTransients
    ? transientResult({
        log,
        angleRad: wholeAngle,
        filters,
        grid,
        tracked,
        segments,
        order: q,
        revsPerBlock: R,
        binRpm,
      })
    : null;
  const isolation = part
    ? part.isolation
    : isolationCurve(tracked, q, binRpm, gearboxNoiseFloor(tracked));
  const nearNoise = isolation.filter((p) => !p.aboveNoise).length;
  if (nearNoise > 0)
    warnings.push({
      code: "gearbox_near_noise",
      message: `at ${countText(nearNoise, "engine speed")} the gearbox firing-order amplitude is close to the sensor noise; isolation there is a lower bound`,
    });
  const measured = isolation.filter((p) => p.aboveNoise);
  const res = findResonance(isolation);
  if (!res.found) warnings.push({ code: "no_resonance", message: res.reason });
  const fit = fitTwoMassModel(measured, q);
  if (!fit.ok) warnings.push({ code: "no_model_fit", message: fit.reason });
  const idle = rattleCheck({
    timeS: log.timeS,
    gearboxRadS: log.gearboxRadS,
    sampleRateHz: fs,
    tracked,
    segments,
    firingOrder: q,
    limitRadS2: limit,
  });
  const spectrumSegment = pickSpectrumSegment(segments);
  const spectrum = spectrumSegment
    ? timeSpectrum({
        timeS: log.timeS,
        crankRadS: log.crankRadS,
        gearboxRadS: log.gearboxRadS,
        sampleRateHz: fs,
        segment: spectrumSegment,
        topOrder,
      })
    : null;
  const result: AnalysisResult = {
    firingOrder: q,
    sampleRateHz: round(fs, 3),
    durationS: round(log.timeS[n - 1]! - log.timeS[0]!, 3),
    settings: {
      cylinders,
      stroke,
      firingOrder: q,
      samplesPerRev: tracked.samplesPerRevRange[1],
      samplesPerRevMin: tracked.samplesPerRevRange[0],
      samplesPerRevFixed: grid.fixedSamplesPerRev !== null,
      revsPerBlock: R,
      overlap,
      binRpm,
      rattleLimitRadS2: limit,
      orderResolution: 1 / R,
      topOrder,
      lowPassHz: grid.lowPassHz === null ? null : round(grid.lowPassHz, 2),
      minValidRpm: round(minValidRpm, 1),
      window: "hann-periodic",
      detrend: "linear",
    },
    blocks: tracked.blockCount,
    isolation,
    orderCurves: orders.map((order) => orderCurve(tracked, order, binRpm)),
    orderMap: orderMap(tracked, topOrder),
    segments,
    idle,
    resonance: res.found ? { rpm: res.rpm, isolationDb: res.isolationDb } : null,
    model: fit.ok
      ? {
          naturalFrequencyHz: round(fit.fit.naturalFrequencyHz, 3),
          dampingRatio: round(fit.fit.dampingRatio, 4),
          resonanceRpm: round((fit.fit.naturalFrequencyHz * 60) / q, 1),
          rmsErrorDb: round(fit.fit.rmsErrorDb, 2),
          bins: fit.fit.bins,
        }
      : null,
    timeSpectrum: spectrum,
    speedTrace: sectionSpeedTrace(log),
    ...(part ? { transient: part.transient, events: part.events, twist: part.twist } : {}),
    warnings: warnings.map(({ code, message }) => ({ code, message })),
    source: sourceBlock(log),
  };
  const checked = analysisResultSchema.safeParse(result);
  onProgress?.("results", 1);
  if (!checked.success) {
    return fail(
      "result_invalid",
      `the analysis produced an invalid result (${checked.error.issues[0]?.path.join(".") ?? "?"}); please report this log`,
      warnings,
    );
  }
  return { ok: true, value: checked.data, warnings };
}
