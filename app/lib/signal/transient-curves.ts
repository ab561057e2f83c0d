/**
 * The order filter's samples (transient.ts) binned by engine speed like the blocks' curves
 * (order-curves.ts): per bin the crank and gearbox firing-order amplitudes are power-averaged
 * over the resolved samples, so a bin's isolation is 20·log10(√mean|C|² / √mean|G|²), and the
 * twist amplitude |C − G|/(2πf) (twist.ts) is power-averaged alike.
 *
 * Merging with the blocks: blocks that overlap a fast span are left out of isolation and twist
 * (they straddle a speed change of more than 5 %); a bin that still has blocks keeps the blocks'
 * value (steady or slow data, the reference method); the filter fills the bins the blocks do
 * not reach. A filter bin's `blocks` is its samples ÷ the samples of one block of R revolutions
 * at the bin's speed, at least 1.
 */
import { NOISE_MARGIN, type IsolationPoint } from "./isolation.ts";
import { round } from "./order-curves.ts";
import type { TrackedBlocks } from "./order-tracking.ts";
import type { SpanMeasure } from "./span-measure.ts";
import { STANDSTILL_RPM } from "./transient.ts";
import { twistAmplitudeDeg, type TwistPoint } from "./twist.ts";

export type Method = "blocks" | "filter";

/** The filter's samples in one rpm bin, summed. */
export interface FilterBin {
  /** Sums over the resolved samples of |C|², |G|², noise² and twist², rad²/s² and deg². */
  c2: number;
  g2: number;
  noise2: number;
  twist2: number;
  /** Resolved log samples in the bin (stored samples × stride), and stored samples. */
  n: number;
  k: number;
  /**
   * Stored samples at or above standstill by what kept them out of the curve (unresolvedReason,
   * transient-analysis.ts): 0 none, 1–3 SpanMeasure's unresolved codes, 4 the gearbox amplitude
   * within the noise.
   */
  reasons: [number, number, number, number, number];
}

/**
 * The filter's samples of every span measured so far, per rpm bin index round(rpm / binRpm):
 * kept in place of the samples themselves, which grow with the log (a 30 s run-up at 5 kHz
 * stores about 7 MB of them).
 */
export type FilterBins = Map<number, FilterBin>;

/** Adds one span's samples to `bins`, in the samples' order (the sums do not depend on windows). */
export function addMeasure(bins: FilterBins, m: SpanMeasure, order: number, binRpm: number): void {
  for (let j = 0; j < m.rpm.length; j++) {
    const rpm = m.rpm[j]!;
    const key = Math.round(rpm / binRpm);
    let e = bins.get(key);
    if (!e) {
      e = { c2: 0, g2: 0, noise2: 0, twist2: 0, n: 0, k: 0, reasons: [0, 0, 0, 0, 0] };
      bins.set(key, e);
    }
    const c = { re: m.cRe[j]!, im: m.cIm[j]! };
    const g = { re: m.gRe[j]!, im: m.gIm[j]! };
    const code = m.unresolved[j]!;
    if (rpm >= STANDSTILL_RPM)
      e.reasons[
        code === 0 && Math.hypot(g.re, g.im) < NOISE_MARGIN * m.noiseRadS[j]! ? 4 : code
      ]!++;
    if (code) continue;
    e.c2 += c.re * c.re + c.im * c.im;
    e.g2 += g.re * g.re + g.im * g.im;
    e.noise2 += m.noiseRadS[j]! ** 2;
    e.twist2 += twistAmplitudeDeg(c, g, (order * rpm) / 60) ** 2;
    e.n += m.stride;
    e.k++;
  }
}

/** The bins with resolved samples, ascending: [rpm, bin]. */
function resolvedBins(bins: FilterBins, binRpm: number): [number, FilterBin][] {
  return [...bins.entries()]
    .filter(([, e]) => e.k > 0)
    .sort((a, b) => a[0] - b[0])
    .map(([key, e]) => [key * binRpm, e]);
}

const blocksOf = (samples: number, rpm: number, sampleRateHz: number, R: number) =>
  Math.max(1, Math.round(samples / ((sampleRateHz * 60 * R) / Math.max(rpm, 1))));

/** Isolation per rpm bin from the filter's samples (method "filter"). */
export function filterIsolation(
  bins: FilterBins,
  args: { binRpm: number; sampleRateHz: number; revsPerBlock: number },
): IsolationPoint[] {
  const out: IsolationPoint[] = [];
  for (const [rpm, e] of resolvedBins(bins, args.binRpm)) {
    if (!(e.c2 > 0 && e.g2 > 0)) continue;
    out.push({
      rpm,
      dB: round(10 * Math.log10(e.c2 / e.g2), 2),
      blocks: blocksOf(e.n, rpm, args.sampleRateHz, args.revsPerBlock),
      aboveNoise: !(e.g2 < NOISE_MARGIN * NOISE_MARGIN * e.noise2),
      method: "filter",
    });
  }
  return out;
}

/** Twist amplitude per rpm bin from the filter's samples, degrees 0-peak. */
export function filterTwist(
  bins: FilterBins,
  args: { binRpm: number; sampleRateHz: number; revsPerBlock: number },
): (TwistPoint & { method: Method })[] {
  return resolvedBins(bins, args.binRpm).map(([rpm, e]) => ({
    rpm,
    deg: round(Math.sqrt(e.twist2 / e.k), 4),
    blocks: blocksOf(e.n, rpm, args.sampleRateHz, args.revsPerBlock),
    method: "filter" as const,
  }));
}

/** Bins of `blocks` where they exist, of `filter` elsewhere, ascending by rpm. */
export function mergeByRpm<T extends { rpm: number }>(blocks: readonly T[], filter: readonly T[]) {
  const have = new Set(blocks.map((p) => p.rpm));
  return [...blocks, ...filter.filter((p) => !have.has(p.rpm))].sort((a, b) => a.rpm - b.rpm);
}

/**
 * The blocks that lie outside every span (time ranges in s), as a TrackedBlocks of their own so
 * the existing curve functions (isolationCurve, twistCurve, gearboxNoiseFloor) read only them.
 * `inPlace` moves the kept blocks to the front of tracked's own arrays instead of copying them
 * (for a caller that reads `tracked` no more: a long log's block spectra are its largest part).
 */
export function blocksOutside(
  tracked: TrackedBlocks,
  spans: readonly { startS: number; endS: number }[],
  inPlace = false,
): TrackedBlocks {
  if (spans.length === 0) return tracked;
  const keep: number[] = [];
  for (let b = 0; b < tracked.blockCount; b++) {
    const a = tracked.blockStartS[b]!;
    const e = tracked.blockEndS[b]!;
    if (!spans.some((s) => a < s.endS && e > s.startS)) keep.push(b);
  }
  const bins = tracked.columnsPerBlock ?? tracked.binsPerBlock;
  const pick = (x: Float64Array, w: number) => {
    // Kept block i comes from block b ≥ i: moving them forward in order never overwrites one
    // still to be moved.
    const out = inPlace ? x : new Float64Array(keep.length * w);
    keep.forEach((b, i) => out.set(x.subarray(b * w, (b + 1) * w), i * w));
    return inPlace ? x.subarray(0, keep.length * w) : out;
  };
  return {
    ...tracked,
    blockCount: keep.length,
    blockRadS: pick(tracked.blockRadS, 1),
    blockStartS: pick(tracked.blockStartS, 1),
    blockEndS: pick(tracked.blockEndS, 1),
    crankAmp: pick(tracked.crankAmp, bins),
    gearboxAmp: pick(tracked.gearboxAmp, bins),
    twistRadS: tracked.twistRadS ? pick(tracked.twistRadS, 1) : undefined,
    noiseFloor: tracked.noiseFloor ? pick(tracked.noiseFloor, 1) : undefined,
  };
}
