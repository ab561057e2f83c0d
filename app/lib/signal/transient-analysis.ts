/**
 * The transient part of the analysis (docs/signal-computation.md, "Transients"), section by
 * section like the blocks (section-analysis.ts): fast spans (transient.ts), the order filter over
 * each, the start and stop events (events.ts) and the adaptive blocks (adaptive-blocks.ts).
 * Indices and times come back in the whole log's terms.
 */
import { adaptiveBlocks, type AdaptiveBlock } from "./adaptive-blocks.ts";
import { integrateAngle, type AngleGrid } from "./angle-grid.ts";
import { transientEvents } from "./events.ts";
import { gearboxNoiseFloor, isolationCurve, type IsolationPoint } from "./isolation.ts";
import { filtfilt, type Biquad } from "./lowpass.ts";
import { round } from "./order-curves.ts";
import type { TrackedBlocks } from "./order-tracking.ts";
import type { TransientEvent, TransientInfo, TwistBlock } from "./result-schema.ts";
import type { Segment } from "./segments.ts";
import { sectionsOf } from "./section-analysis.ts";
import {
  findFastSpans,
  MAX_CHANGE_PER_FIRING,
  MAX_SPEED_CHANGE_PER_BLOCK,
  SLEW_REFERENCE_RPM,
  slewLimitRpmS,
  TRANSIENT_FILTER,
  RESOLVE_RATIO,
  type FastSpan,
} from "./transient.ts";
import { measureSpan, type SpanMeasure } from "./span-measure.ts";
import {
  addMeasure,
  blocksOutside,
  filterIsolation,
  filterTwist,
  mergeByRpm,
  type FilterBins,
} from "./transient-curves.ts";
import { TWIST_DRIFT_CUTOFF_HZ, twistCurve } from "./twist.ts";
import type { DriveLog } from "./types.ts";

export interface TransientPart {
  /** Spans with times in the log's terms (indices relative to their section). */
  spans: FastSpan[];
  /** The order filter's samples of every span, per rpm bin (addMeasure, transient-curves.ts). */
  bins: FilterBins;
  events: TransientEvent[];
  blocks: AdaptiveBlock[];
}

/** A TransientPart with nothing measured yet. */
export const emptyTransientPart = (): TransientPart => ({
  spans: [],
  bins: new Map(),
  events: [],
  blocks: [],
});

/** What analyseTransients and its stages take. */
export interface TransientArgs {
  log: DriveLog;
  /** The whole log's crank angle when it has one section (saves integrating it again). */
  angleRad?: Float64Array;
  filters: readonly Biquad[];
  grid: AngleGrid;
  order: number;
  revsPerBlock: number;
  binRpm: number;
  idleRpm: number | null;
}

/** One fast span to measure: the index of its section (sectionsOf) and the span in its terms. */
export interface SpanWork {
  section: number;
  span: FastSpan;
}

/** What one span gives: the order filter's samples, its event (a start or stop) and its blocks. */
export interface SpanResult {
  measure: SpanMeasure;
  events: TransientEvent[];
  blocks: AdaptiveBlock[];
}

interface Stretch {
  timeS: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
}

/** The arrays of section `k` of the log (sectionsOf). */
function stretchOf(log: DriveLog, k: number): Stretch {
  const s = sectionsOf(log)[k]!;
  return {
    timeS: log.timeS.subarray(s.startIndex, s.endIndex),
    crankRadS: log.crankRadS.subarray(s.startIndex, s.endIndex),
    gearboxRadS: log.gearboxRadS.subarray(s.startIndex, s.endIndex),
  };
}

/** Crank angles of the sections, integrated once each (the whole log's when given). */
export type AngleCache = Map<number, Float64Array>;

function angleOf(args: TransientArgs, k: number, stretch: Stretch, cache: AngleCache) {
  let angle = cache.get(k);
  if (!angle) {
    angle =
      args.angleRad && stretch.timeS.length === args.log.timeS.length
        ? args.angleRad
        : integrateAngle(stretch.timeS, stretch.crankRadS);
    cache.set(k, angle);
  }
  return angle;
}

/** The fast spans of every section in order (transient.ts), the first stage of the transients. */
export function transientSpans(args: TransientArgs, cache: AngleCache = new Map()): SpanWork[] {
  const out: SpanWork[] = [];
  sectionsOf(args.log).forEach((_, k) => {
    const stretch = stretchOf(args.log, k);
    if (stretch.timeS.length < 4) return;
    const spans = findFastSpans({
      timeS: stretch.timeS,
      angleRad: angleOf(args, k, stretch, cache),
      revsPerBlock: args.revsPerBlock,
      idleRpm: args.idleRpm,
    });
    for (const span of spans) out.push({ section: k, span });
  });
  return out;
}

/** Measures one span (the second stage; spans are independent, so any thread may take one). */
export function measureSpanWork(
  args: TransientArgs,
  work: SpanWork,
  cache: AngleCache = new Map(),
): SpanResult {
  const stretch = stretchOf(args.log, work.section);
  const angleRad = angleOf(args, work.section, stretch, cache);
  const fs = args.log.sampleRateHz;
  const q = args.order;
  const measure = measureSpan({
    ...stretch,
    angleRad,
    sampleRateHz: fs,
    order: q,
    span: work.span,
  });
  return {
    measure,
    events: transientEvents({ ...stretch, sampleRateHz: fs, order: q, measures: [measure] }),
    blocks: spanBlocks({ ...stretch, angleRad }, work.span, { ...args, sampleRateHz: fs }),
  };
}

/**
 * The part from the spans' results in the order of transientSpans (the last stage): the
 * filter's samples binned by rpm in that order, the events and blocks listed in it.
 */
export function transientPartOf(
  args: TransientArgs,
  results: readonly SpanResult[],
): TransientPart {
  const out = emptyTransientPart();
  for (const r of results) {
    out.spans.push(r.measure.span);
    addMeasure(out.bins, r.measure, args.order, args.binRpm);
    out.events.push(...r.events);
    out.blocks.push(...r.blocks);
  }
  return out;
}

/** The transients of a log on one thread: spans found, each measured, the part assembled. */
export function analyseTransients(args: TransientArgs): TransientPart {
  const cache: AngleCache = new Map();
  const works = transientSpans(args, cache);
  return transientPartOf(
    args,
    works.map((w) => measureSpanWork(args, w, cache)),
  );
}

/**
 * The adaptive blocks of one fast span (adaptive-blocks.ts), cut from the stretch's arrays half a
 * second beyond the span on each side and low-passed like the fixed blocks.
 */
export function spanBlocks(
  stretch: {
    timeS: Float64Array;
    angleRad: Float64Array;
    crankRadS: Float64Array;
    gearboxRadS: Float64Array;
  },
  span: { startIndex: number; endIndex: number },
  args: {
    sampleRateHz: number;
    filters: readonly Biquad[];
    grid: AngleGrid;
    order: number;
    revsPerBlock: number;
  },
): AdaptiveBlock[] {
  const { timeS, angleRad, crankRadS, gearboxRadS } = stretch;
  const pad = Math.ceil(0.5 * args.sampleRateHz);
  const a = Math.max(0, span.startIndex - pad);
  const b = Math.min(timeS.length, span.endIndex + pad);
  const lp = (x: Float64Array) => (args.filters.length ? filtfilt(x, args.filters) : x);
  return adaptiveBlocks({
    timeS: timeS.subarray(a, b),
    angleRad: angleRad.subarray(a, b),
    crankRadS: lp(crankRadS.subarray(a, b)),
    gearboxRadS: lp(gearboxRadS.subarray(a, b)),
    grid: args.grid,
    order: args.order,
    spans: [{ startIndex: span.startIndex - a, endIndex: span.endIndex - a }],
    maxRevs: args.revsPerBlock,
  });
}

/**
 * Why the isolation curve stops at `lowestRpm`: the commonest reason among the filter's samples
 * in the bin below it (above standstill). Null when the filter has no samples there (the log
 * reaches no lower, or only the blocks measured it).
 */
export function unresolvedReason(
  bins: FilterBins,
  lowestRpm: number | null,
  binRpm: number,
): string | null {
  if (lowestRpm === null) return null;
  // The bin below lowestRpm: samples in [lowestRpm − 1.5·binRpm, lowestRpm − 0.5·binRpm).
  const counts = bins.get(Math.round(lowestRpm / binRpm) - 1)?.reasons ?? [0, 0, 0, 0, 0];
  let best = 1;
  for (let c = 2; c <= 4; c++) if (counts[c]! > counts[best]!) best = c;
  if (counts[best] === 0) return null;
  const at = `below ${lowestRpm - binRpm / 2} rpm`;
  switch (best) {
    case 1:
      return `${at} the firing order's frequency is within ${RESOLVE_RATIO} times the order filter's bandwidth, too close to the speed's own slow changes to be told apart`;
    case 2:
      return `${at} the log starts or ends within the order filter's settling time, so the firing order cannot be read there`;
    case 3:
      return `${at} the engine speed changes by more than ${MAX_CHANGE_PER_FIRING * 100} % within one firing period, too fast for the order filter`;
    default:
      return `${at} the gearbox firing-order amplitude is within the sensor noise`;
  }
}

/** Lowest bin above the noise, rpm; null when none is. */
export function lowestResolved(points: readonly IsolationPoint[]): number | null {
  const measured = points.filter((p) => p.aboveNoise);
  return measured.length ? Math.min(...measured.map((p) => p.rpm)) : null;
}

/** Idle speed for the span kinds: the longest idle segment's mean, or null. */
export function idleOf(segments: readonly Segment[]): number | null {
  const idle = segments
    .filter((s) => s.kind === "idle")
    .sort((a, b) => b.endS - b.startS - (a.endS - a.startS));
  return idle[0]?.meanRpm ?? null;
}

/**
 * Everything the result takes from the transients: the merged isolation curve (blocks outside
 * the fast spans, the filter inside; transient-curves.ts), `transient`, `events` and `twist`.
 */
export function transientResult(args: {
  log: DriveLog;
  angleRad?: Float64Array;
  filters: readonly Biquad[];
  grid: AngleGrid;
  tracked: TrackedBlocks;
  segments: readonly Segment[];
  order: number;
  revsPerBlock: number;
  binRpm: number;
  /** The caller reads `tracked` no more: its arrays may be reused (blocksOutside). */
  inPlace?: boolean;
  /** The spans already measured, as analyseTransients measures them (the CLI's helper thread). */
  measured?: TransientPart;
}): {
  isolation: IsolationPoint[];
  transient: TransientInfo;
  events: TransientEvent[];
  twist: TwistBlock;
} {
  const part = args.measured ?? analyseTransients({ ...args, idleRpm: idleOf(args.segments) });
  return transientResultOf(part, { ...args, sampleRateHz: args.log.sampleRateHz });
}

/** transientResult from the transients already measured (`part`). */
export function transientResultOf(
  part: TransientPart,
  args: {
    tracked: TrackedBlocks;
    order: number;
    revsPerBlock: number;
    binRpm: number;
    sampleRateHz: number;
    inPlace?: boolean;
  },
): ReturnType<typeof transientResult> {
  const { order: q, binRpm, revsPerBlock: R } = args;
  const spans = part.spans;
  const steady = blocksOutside(args.tracked, spans, args.inPlace);
  const binArgs = { order: q, binRpm, sampleRateHz: args.sampleRateHz, revsPerBlock: R };
  const isolation = mergeByRpm(
    isolationCurve(steady, q, binRpm, gearboxNoiseFloor(steady)),
    filterIsolation(part.bins, binArgs),
  );
  const lowest = lowestResolved(isolation);
  const r3 = (x: number) => round(x, 3);
  return {
    isolation,
    transient: {
      slewThresholdRpmS: round(slewLimitRpmS(SLEW_REFERENCE_RPM, R), 1),
      slewReferenceRpm: SLEW_REFERENCE_RPM,
      maxSpeedChangePerBlock: MAX_SPEED_CHANGE_PER_BLOCK,
      filter: {
        method: "vold-kalman-2",
        poles: TRANSIENT_FILTER.poles,
        bandwidthOrders: TRANSIENT_FILTER.bandwidthOrders,
        minBandwidthHz: TRANSIENT_FILTER.minBandwidthHz,
      },
      spans: spans.map((s) => ({ kind: s.kind, startS: r3(s.startS), endS: r3(s.endS) })),
      lowestResolvedRpm: lowest,
      unresolvedReason: unresolvedReason(part.bins, lowest, binRpm),
      blocks: part.blocks.map((b) => ({
        startS: r3(b.startS),
        endS: r3(b.endS),
        rpm: round(b.rpm, 1),
        revs: b.revs,
        orderResolution: round(b.orderResolution, 4),
        crankRadS: round(b.crankRadS, 5),
        gearboxRadS: round(b.gearboxRadS, 5),
      })),
    },
    events: part.events,
    twist: {
      curve: mergeByRpm(
        twistCurve(steady, q, binRpm).map((p) => ({
          ...p,
          deg: round(p.deg, 4),
          method: "blocks" as const,
        })),
        filterTwist(part.bins, binArgs),
      ),
      driftCutoffHz: TWIST_DRIFT_CUTOFF_HZ,
    },
  };
}
