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
import { twistAmplitudeDeg, type TwistPoint } from "./twist.ts";

export type Method = "blocks" | "filter";

interface Bin {
  c2: number;
  g2: number;
  noise2: number;
  twist2: number;
  /** Log samples in the bin (stored samples × stride), and stored samples. */
  n: number;
  k: number;
}

function binSamples(measures: readonly SpanMeasure[], order: number, binRpm: number) {
  const bins = new Map<number, Bin>();
  for (const m of measures) {
    for (let j = 0; j < m.rpm.length; j++) {
      if (m.unresolved[j]) continue;
      const rpm = m.rpm[j]!;
      const key = Math.round(rpm / binRpm) * binRpm;
      const e = bins.get(key) ?? { c2: 0, g2: 0, noise2: 0, twist2: 0, n: 0, k: 0 };
      const c = { re: m.cRe[j]!, im: m.cIm[j]! };
      const g = { re: m.gRe[j]!, im: m.gIm[j]! };
      e.c2 += c.re * c.re + c.im * c.im;
      e.g2 += g.re * g.re + g.im * g.im;
      e.noise2 += m.noiseRadS[j]! ** 2;
      e.twist2 += twistAmplitudeDeg(c, g, (order * rpm) / 60) ** 2;
      e.n += m.stride;
      e.k++;
      bins.set(key, e);
    }
  }
  return [...bins.entries()].sort((a, b) => a[0] - b[0]);
}

const blocksOf = (samples: number, rpm: number, sampleRateHz: number, R: number) =>
  Math.max(1, Math.round(samples / ((sampleRateHz * 60 * R) / Math.max(rpm, 1))));

/** Isolation per rpm bin from the filter's samples (method "filter"). */
export function filterIsolation(
  measures: readonly SpanMeasure[],
  args: { order: number; binRpm: number; sampleRateHz: number; revsPerBlock: number },
): IsolationPoint[] {
  const out: IsolationPoint[] = [];
  for (const [rpm, e] of binSamples(measures, args.order, args.binRpm)) {
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
  measures: readonly SpanMeasure[],
  args: { order: number; binRpm: number; sampleRateHz: number; revsPerBlock: number },
): (TwistPoint & { method: Method })[] {
  return binSamples(measures, args.order, args.binRpm).map(([rpm, e]) => ({
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
  const bins = tracked.binsPerBlock;
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
  };
}
