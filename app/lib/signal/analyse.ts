/**
 * The analysis pipeline: drive log in, result JSON out (docs/architecture.md §4; method and defaults in
 * docs/signal-computation.md). Pure computation; errors come back as values.
 */
import { resolveOptions, type AnalysisOptions } from "./analysis-options.ts";
import {
  fail,
  finishAnalysis,
  quantileOf,
  quantileStride,
  setupAnalysis,
  type AnalysisStage,
} from "./analysis-assembly.ts";
import { integrateAngle } from "./angle-grid.ts";
import { helpedAngle, helpedFiltfilt, helpedTransients } from "./block-helper.ts";
import { filtfilt } from "./lowpass.ts";
import { trackBlocks, type TrackedBlocks } from "./order-tracking.ts";
import { rattleCheck } from "./rattle.ts";
import type { Segment } from "./segments.ts";
import type { AnalysisResult } from "./result-schema.ts";
import {
  sectionsOf,
  sectionSegments,
  sectionSpeedTrace,
  skippedWarnings,
  trackSections,
} from "./section-analysis.ts";
import { sourceBlock } from "./source-block.ts";
import { timeSpectrum } from "./time-spectrum.ts";
import { idleOf, transientResult } from "./transient-analysis.ts";
import type { DriveLog, Outcome } from "./types.ts";

export type { AnalysisStage } from "./analysis-assembly.ts";

export function isPositive(x: unknown): x is number {
  return typeof x === "number" && Number.isFinite(x) && x > 0;
}

/** Value at quantile p (0…1) of up to ~100 000 evenly strided samples of x. */
function quantile(x: Float64Array, p: number): number {
  const stride = quantileStride(x.length);
  const s: number[] = [];
  for (let i = 0; i < x.length; i += stride) s.push(x[i]!);
  return quantileOf(s, p);
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
  const { firingOrder: q, topOrder } = resolved.value;
  const { revsPerBlock: R, binRpm, rattleLimitRadS2: limit } = resolved.value;
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
  onProgress?.("track", 0);
  const fs = log.sampleRateHz;
  const ready = setupAnalysis(resolved.value, fs, quantile(log.crankRadS, 0.999), o.samplesPerRev);
  if (!ready.ok) return ready.outcome;
  const { setup } = ready;
  const { filters, trackArgs, warnings } = setup;
  let tracked: TrackedBlocks;
  let segments: Segment[];
  let wholeAngle: Float64Array | undefined; // kept for the transients (one section only)
  if (!log.sections || log.sections.length < 2) {
    // With the CLI's helper thread the gearbox channel is low-passed and the crank angle
    // integrated there, while this thread low-passes the crank and finds the segments.
    const helpedGearbox = filters.length ? helpedFiltfilt(log.gearboxRadS, filters) : undefined;
    const helpedCrankAngle = helpedAngle(log.timeS, log.crankRadS);
    const crank = filters.length ? filtfilt(log.crankRadS, filters) : log.crankRadS;
    onProgress?.("track", 0.4);
    segments = sectionSegments(log);
    const gearbox = filters.length
      ? (helpedGearbox?.wait() ?? filtfilt(log.gearboxRadS, filters))
      : log.gearboxRadS;
    onProgress?.("track", 0.8);
    const angle = helpedCrankAngle?.wait() ?? integrateAngle(log.timeS, log.crankRadS);
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
    segments = sectionSegments(log);
  }
  onProgress?.("spectra", 1);
  const transientArgs = {
    log,
    angleRad: wholeAngle,
    filters,
    grid: setup.grid,
    order: q,
    revsPerBlock: R,
    binRpm,
  };
  // With the CLI's helper thread, the transients are measured there while this thread computes
  // the rest of the result (block-helper.ts); the same part either way.
  const helped = withTransients
    ? helpedTransients({ ...transientArgs, idleRpm: idleOf(segments) })
    : undefined;
  return finishAnalysis(
    setup,
    tracked,
    {
      segments,
      durationS: log.timeS[n - 1]! - log.timeS[0]!,
      // Transients: fast spans measured by the order filter, their blocks left out of the curve.
      transients: (t) =>
        withTransients
          ? transientResult({
              ...transientArgs,
              tracked: t,
              segments,
              inPlace: true,
              measured: helped?.wait(),
            })
          : null,
      rattle: (t) =>
        rattleCheck({
          timeS: log.timeS,
          gearboxRadS: log.gearboxRadS,
          sampleRateHz: fs,
          tracked: t,
          segments,
          firingOrder: q,
          limitRadS2: limit,
        }),
      spectrum: (segment) =>
        timeSpectrum({
          timeS: log.timeS,
          crankRadS: log.crankRadS,
          gearboxRadS: log.gearboxRadS,
          sampleRateHz: fs,
          segment,
          topOrder,
        }),
      speedTrace: () => sectionSpeedTrace(log),
      source: () => sourceBlock(log.source, sectionsOf(log)),
    },
    onProgress,
  );
}
