/**
 * Isolation at one order: 20·log10(A_crank / A_gearbox) in dB per rpm bin (a field-quantity
 * level, ISO 80000-3 item 3-21). Positive = attenuation by the damper; negative = amplification
 * (resonance region). Also: the gearbox channel's noise floor, and the damper resonance.
 */
import { RPM_PER_RAD_S } from "./firing-order.ts";
import { binOrder, round } from "./order-curves.ts";
import type { TrackedBlocks } from "./order-tracking.ts";

/** A bin counts as measured when the gearbox amplitude is at least this many times its noise floor. */
export const NOISE_MARGIN = 5;

/**
 * Gearbox noise floor per block in rad/s: the median amplitude of the bins that lie between the
 * half-order lines (orders k/2 ± 1/R are skipped, where engine orders sit). NaN when R < 4
 * leaves no such bins.
 */
export function gearboxNoiseFloor(tracked: TrackedBlocks): Float64Array {
  if (tracked.noiseFloor) return tracked.noiseFloor;
  const floor = noiseFloorOf(tracked.binsPerBlock, tracked.revsPerBlock);
  const out = new Float64Array(tracked.blockCount);
  for (let b = 0; b < tracked.blockCount; b++)
    out[b] = floor(tracked.gearboxAmp, b * tracked.binsPerBlock);
  return out;
}

/**
 * The noise floor of one block's gearbox spectrum (bins 0 … binsPerBlock−1 at [at + k]), as
 * gearboxNoiseFloor takes it; NaN when R leaves no bin between the half-order lines.
 */
export function noiseFloorOf(
  binsPerBlock: number,
  revsPerBlock: number,
): (gearbox: Float64Array, at: number) => number {
  const half = revsPerBlock / 2; // bins per half order
  const quiet: number[] = [];
  if (Number.isInteger(half))
    for (let k = 1; k < binsPerBlock; k++) {
      const fromLine = k % half;
      if (Math.min(fromLine, half - fromLine) > 1) quiet.push(k);
    }
  if (quiet.length === 0) return () => NaN;
  const vals = new Float64Array(quiet.length);
  return (gearbox, at) => {
    for (let i = 0; i < quiet.length; i++) vals[i] = gearbox[at + quiet[i]!]!;
    vals.sort();
    return vals[vals.length >> 1]!;
  };
}

export interface IsolationPoint {
  rpm: number;
  dB: number;
  /** Blocks averaged into this bin. */
  blocks: number;
  /** False when the gearbox amplitude is within NOISE_MARGIN of its noise floor (dB is then a lower bound). */
  aboveNoise: boolean;
  /** "blocks" (fixed blocks) or "filter" (the order filter over fast spans, transient-curves.ts). */
  method?: "blocks" | "filter";
}

/** Isolation per rpm bin at `order` (dB), with the noise check. Bins with a zero amplitude are left out. */
export function isolationCurve(
  tracked: TrackedBlocks,
  order: number,
  binRpm: number,
  noise: Float64Array,
): IsolationPoint[] {
  const curve = binOrder(tracked, order, binRpm);
  // Noise per bin, power-averaged like the amplitudes.
  const noiseSum = new Map<number, { s: number; n: number }>();
  for (let b = 0; b < tracked.blockCount; b++) {
    const v = noise[b]!;
    if (!Number.isFinite(v)) continue;
    const bin = Math.round((tracked.blockRadS[b]! * RPM_PER_RAD_S) / binRpm) * binRpm;
    const e = noiseSum.get(bin) ?? { s: 0, n: 0 };
    e.s += v * v;
    e.n += 1;
    noiseSum.set(bin, e);
  }
  const out: IsolationPoint[] = [];
  curve.rpm.forEach((rpm, i) => {
    const c = curve.crankRadS[i]!;
    const g = curve.gearboxRadS[i]!;
    if (!(c > 0 && g > 0)) return;
    const nz = noiseSum.get(rpm);
    const floor = nz ? Math.sqrt(nz.s / nz.n) : NaN;
    out.push({
      rpm,
      dB: round(20 * Math.log10(c / g), 2),
      blocks: curve.blocks[i]!,
      aboveNoise: !(g < NOISE_MARGIN * floor),
      method: "blocks",
    });
  });
  return out;
}

export type ResonanceOutcome =
  { found: true; rpm: number; isolationDb: number } | { found: false; reason: string };

/**
 * Damper resonance: the bin of least isolation, reported only when it is amplification (dB < 0)
 * and lies inside the measured range (a neighbour on each side), among bins above the noise.
 */
export function findResonance(points: readonly IsolationPoint[]): ResonanceOutcome {
  const usable = points.filter((p) => p.aboveNoise);
  if (usable.length < 3)
    return {
      found: false,
      reason: "too few engine-speed bins above the noise to look for the damper resonance",
    };
  let iMin = 0;
  usable.forEach((p, i) => {
    if (p.dB < usable[iMin]!.dB) iMin = i;
  });
  const min = usable[iMin]!;
  if (min.dB >= 0) {
    return {
      found: false,
      reason: "the damper isolates at every measured speed; the log does not reach its resonance",
    };
  }
  if (iMin === 0 || iMin === usable.length - 1) {
    return {
      found: false,
      reason: `least isolation is at the edge of the measured range (${min.rpm} rpm); the resonance may lie outside it`,
    };
  }
  return { found: true, rpm: min.rpm, isolationDb: min.dB };
}
