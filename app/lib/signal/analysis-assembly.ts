/**
 * The parts of the analysis shared by the batch entry (analyse.ts, a DriveLog in memory) and the
 * bounded-memory entry (analyse-samples.ts, a SampleSource read in windows): the angle grid and
 * filters chosen from the top crank speed, and everything derived from the tracked blocks into
 * the result document. Method in docs/signal-computation.md; this file only assembles.
 */
import type { ResolvedOptions } from "./analysis-options.ts";
import { RPM_PER_RAD_S } from "./firing-order.ts";
import { findResonance, gearboxNoiseFloor, isolationCurve } from "./isolation.ts";
import { orderBin, orderCurve, orderMap, round } from "./order-curves.ts";
import { chooseAngleGrid, MAX_SAMPLES_PER_REV, type AngleGrid } from "./angle-grid.ts";
import { butterworthLowpass4, type Biquad } from "./lowpass.ts";
import type { TrackedBlocks } from "./order-tracking.ts";
import type { RattleCheck } from "./rattle.ts";
import { analysisResultSchema, type AnalysisResult } from "./result-schema.ts";
import type { Segment } from "./segments.ts";
import { pickSpectrumSegment, type TimeSpectrum } from "./time-spectrum.ts";
import type { SpeedTrace } from "./traces.ts";
import { fitTwoMassModel } from "./two-mass-model.ts";
import type { transientResult } from "./transient-analysis.ts";
import { countText, plural } from "../base/plural.ts";
import type { Outcome, SignalIssue } from "./types.ts";

export type AnalysisStage = "track" | "spectra" | "results";
export type OnProgress = (stage: AnalysisStage, fraction: number) => void;

export function fail(
  code: string,
  message: string,
  warnings: SignalIssue[] = [],
): Outcome<AnalysisResult> {
  return { ok: false, error: { code, message }, warnings };
}

/** Every how many samples the top-speed quantile takes one (about 100 000 in all). */
export const quantileStride = (n: number) => Math.max(1, Math.floor(n / 100_000));

/** Value at quantile p (0…1) of the strided samples `s` (left as they are). */
export function quantileOf(s: readonly number[] | Float64Array, p: number): number {
  // A typed array sorts numerically without a comparator, several times faster.
  const sorted = Float64Array.from(s).sort();
  return sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))] ?? 0;
}

/** What tracking needs, fixed before the first block. */
export interface AnalysisSetup {
  o: ResolvedOptions;
  fs: number;
  grid: AngleGrid;
  filters: Biquad[];
  trackArgs: {
    grid: AngleGrid;
    revsPerBlock: number;
    overlap: number;
    topBin: number;
    firingBin?: number;
  };
  warnings: SignalIssue[];
}

/**
 * The checks on the top crank speed `maxRadS` (0.999 quantile) and the angle grid, low-pass and
 * block settings it leads to; a failure comes back as the Outcome to return.
 */
export function setupAnalysis(
  o: ResolvedOptions,
  fs: number,
  maxRadS: number,
  samplesPerRev: number | undefined,
): { ok: true; setup: AnalysisSetup } | { ok: false; outcome: Outcome<AnalysisResult> } {
  if (!(maxRadS > 0))
    return {
      ok: false,
      outcome: fail(
        "engine_not_running",
        "the crank speed never rises above zero; there is nothing to order-track",
      ),
    };
  // Sampling theorem: order q at shaft rate f needs fs > 2·q·f, so at one sample per crank
  // revolution or fewer not even order 0.5 can be read. Checked before tracking: the blocks
  // cover every revolution however few the samples (two rows 10^7 s apart took minutes and GBs).
  const maxRevPerS = maxRadS / (2 * Math.PI);
  if (!(fs > maxRevPerS))
    return {
      ok: false,
      outcome: fail(
        "sample_rate_too_low",
        `the sampling rate ${fs.toPrecision(3)} Hz is not above one sample per crank revolution (${maxRevPerS.toPrecision(3)} rev/s at ${(maxRadS * RPM_PER_RAD_S).toFixed(0)} rpm), so no engine order can be read; check the time column and its unit`,
      ),
    };
  const { topOrder } = o;
  const grid = chooseAngleGrid({ sampleRateHz: fs, maxRadS, topOrder, samplesPerRev });
  const warnings: SignalIssue[] = [];
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
    revsPerBlock: o.revsPerBlock,
    overlap: o.overlap,
    topBin: Math.ceil(topOrder * o.revsPerBlock) + 2,
    // The block twist |C − G| at the firing order (order-tracking.ts), for result.twist.
    ...(o.transients ? { firingBin: orderBin(o.firingOrder, o.revsPerBlock) } : {}),
  };
  return { ok: true, setup: { o, fs, grid, filters, trackArgs, warnings } };
}

/** The parts of the result read from the samples, each computed when the assembly needs it. */
export interface SampleParts {
  segments: Segment[];
  durationS: number;
  /** Called after everything else that reads the blocks: it may reuse their arrays. */
  transients: (tracked: TrackedBlocks) => ReturnType<typeof transientResult> | null;
  rattle: (tracked: TrackedBlocks) => RattleCheck | null;
  spectrum: (segment: Segment) => TimeSpectrum | null;
  speedTrace: () => SpeedTrace;
  source: () => AnalysisResult["source"];
}

/** Everything derived from the tracked blocks, assembled into the checked result document. */
export function finishAnalysis(
  setup: AnalysisSetup,
  tracked: TrackedBlocks,
  parts: SampleParts,
  onProgress?: OnProgress,
): Outcome<AnalysisResult> {
  const { o, fs, grid, warnings } = setup;
  const { cylinders, stroke, firingOrder: q, orders, topOrder } = o;
  const { revsPerBlock: R, overlap, binRpm, rattleLimitRadS2: limit } = o;
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
  const { segments } = parts;
  // What reads every block first: the transients may then reuse the blocks' arrays.
  const blocks = tracked.blockCount;
  const samplesPerRevRange = tracked.samplesPerRevRange;
  const orderCurves = orders.map((order) => orderCurve(tracked, order, binRpm));
  const map = orderMap(tracked, topOrder);
  const idle = parts.rattle(tracked);
  // The parts read from the samples alone, before the transients (which may be measured on the
  // CLI's helper thread meanwhile).
  const spectrumSegment = pickSpectrumSegment(segments);
  const spectrum = spectrumSegment ? parts.spectrum(spectrumSegment) : null;
  const speedTrace = parts.speedTrace();
  const source = parts.source();
  const noTransients = () => isolationCurve(tracked, q, binRpm, gearboxNoiseFloor(tracked));
  // Transients: fast spans measured by the order filter, their blocks left out of the curve.
  const part = parts.transients(tracked);
  const isolation = part ? part.isolation : noTransients();
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
  const result: AnalysisResult = {
    firingOrder: q,
    sampleRateHz: round(fs, 3),
    durationS: round(parts.durationS, 3),
    settings: {
      cylinders,
      stroke,
      firingOrder: q,
      samplesPerRev: samplesPerRevRange[1],
      samplesPerRevMin: samplesPerRevRange[0],
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
    blocks,
    isolation,
    orderCurves,
    orderMap: map,
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
    speedTrace,
    ...(part ? { transient: part.transient, events: part.events, twist: part.twist } : {}),
    warnings: warnings.map(({ code, message }) => ({ code, message })),
    source,
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
