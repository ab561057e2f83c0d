/**
 * Angle resampling for order tracking (order-tracking.ts, steps 1 and 3): the crank angle from
 * the crank speed, the choice of the uniform angle grid (samples per revolution S, so nothing in
 * the band folds back), and the 4-point cubic Lagrange interpolation of both channels onto it.
 * Units: angle rad, speed rad/s, time s, frequency Hz.
 */
import { float64Array } from "./shared-arrays.ts";

/**
 * Crank angle in rad by the trapezoid rule; negative speeds count as standstill (angle never runs
 * back). Into `out` when given (as long as timeS), else a new array.
 */
export function integrateAngle(
  timeS: Float64Array,
  radS: Float64Array,
  out?: Float64Array,
): Float64Array {
  const n = timeS.length;
  const angle = out ?? float64Array(n);
  if (n > 0) angle[0] = 0;
  for (let i = 1; i < n; i++)
    angle[i] = angleStep(angle[i - 1]!, radS[i - 1]!, radS[i]!, timeS[i - 1]!, timeS[i]!);
  return angle;
}

/**
 * One trapezoid step of integrateAngle: the angle at t1 from the angle at t0 and the speeds
 * there (rad/s; negative speeds count as standstill). The windowed analysis takes the same steps
 * (stream/section-reader.ts), so its angles are bit-identical.
 */
export function angleStep(prev: number, c0: number, c1: number, t0: number, t1: number): number {
  return prev + 0.5 * (Math.max(0, c0) + Math.max(0, c1)) * (t1 - t0);
}

export interface AngleGrid {
  /** Low-pass cutoff in Hz applied before resampling, or null when none was needed. */
  lowPassHz: number | null;
  /** Highest frequency left in the signals after the low-pass (fc, or fs/2), Hz. */
  bandHz: number;
  /** Coarsest grid allowed: Nyquist S/2 at least twice the top order. */
  minSamplesPerRev: number;
  /** A grid fixed by the caller, or null for the per-block choice. */
  fixedSamplesPerRev: number | null;
}

/** Finest grid per revolution; a block that would need more is dropped (it crawls, e.g. cranking). */
export const MAX_SAMPLES_PER_REV = 4096;

/**
 * Chooses the angle grid (see docs/signal-computation.md):
 * - band of interest: orders up to `topOrder` at the top speed, fc = 2·topOrder·n_max (Hz,
 *   n in rev/s); the factor 2 keeps the filter's roll-off off the top order (−0.02 dB there);
 * - if fc < 0.45·fs both channels are low-passed at fc, else the band is the file's own fs/2;
 * - each block then gets its own S (`samplesPerRevFor`), fine enough that nothing in the band
 *   folds back at the slowest speed inside the block. All blocks share the order bins k/R.
 */
export function chooseAngleGrid(args: {
  sampleRateHz: number;
  maxRadS: number;
  topOrder: number;
  samplesPerRev?: number;
}): AngleGrid {
  const nMax = args.maxRadS / (2 * Math.PI);
  const fc = 2 * args.topOrder * nMax;
  const lowPassHz = fc < 0.45 * args.sampleRateHz ? fc : null;
  let minS = 4;
  while (minS / 2 < 2 * args.topOrder) minS *= 2;
  return {
    lowPassHz,
    bandHz: lowPassHz ?? args.sampleRateHz / 2,
    minSamplesPerRev: minS,
    fixedSamplesPerRev: args.samplesPerRev ?? null,
  };
}

/**
 * Samples per revolution for a block whose slowest crank speed is `minRadS`: the smallest power
 * of two with S/2 ≥ band / n_min (and ≥ the grid's minimum). Null when the block is too slow
 * for MAX_SAMPLES_PER_REV or, with a fixed grid, for that grid.
 */
export function samplesPerRevFor(grid: AngleGrid, minRadS: number): number | null {
  const nMin = minRadS / (2 * Math.PI);
  if (!(nMin > 0)) return null;
  const need = (2 * grid.bandHz) / nMin;
  if (grid.fixedSamplesPerRev !== null)
    return grid.fixedSamplesPerRev >= need ? grid.fixedSamplesPerRev : null;
  let s = grid.minSamplesPerRev;
  while (s < need && s < MAX_SAMPLES_PER_REV) s *= 2;
  return s >= need ? s : null;
}

/**
 * Interpolates grid samples p = from … N−1 at angles thetaA + p·dTheta of both channels into
 * bufC/bufG (4-point cubic Lagrange in the sample index; the index position of an angle is
 * linear between samples). `start` is a sample index at or before thetaA.
 */
export function resampleBlock(
  angleRad: Float64Array,
  crankRadS: Float64Array,
  gearboxRadS: Float64Array,
  start: number,
  thetaA: number,
  dTheta: number,
  from: number,
  N: number,
  bufC: Float64Array,
  bufG: Float64Array,
): void {
  const n = angleRad.length;
  let src = start;
  let next = angleRad[src + 1]!;
  for (let p = from; p < N; p++) {
    const theta = thetaA + p * dTheta;
    while (src < n - 2 && next <= theta) next = angleRad[++src + 1]!;
    const a0 = angleRad[src]!;
    const span = next - a0;
    const u = span > 0 ? Math.min(1, Math.max(0, (theta - a0) / span)) : 0;
    const i0 = src > 0 ? src - 1 : 0;
    const i2 = src + 1;
    const i3 = src + 2 < n ? src + 2 : n - 1;
    const wm = (-u * (u - 1) * (u - 2)) / 6;
    const w0 = ((u + 1) * (u - 1) * (u - 2)) / 2;
    const w1 = (-(u + 1) * u * (u - 2)) / 2;
    const w2 = ((u + 1) * u * (u - 1)) / 6;
    bufC[p] =
      wm * crankRadS[i0]! + w0 * crankRadS[src]! + w1 * crankRadS[i2]! + w2 * crankRadS[i3]!;
    bufG[p] =
      wm * gearboxRadS[i0]! +
      w0 * gearboxRadS[src]! +
      w1 * gearboxRadS[i2]! +
      w2 * gearboxRadS[i3]!;
  }
}

/**
 * Index i with angle[i] ≤ theta < angle[i+1] (clamped to 0 … n−2) in the non-decreasing
 * `angleRad`; `hint` is a lower bound. The search gallops from the hint (steps 1, 2, 4, …) before
 * it halves: callers walk the log forward, so the answer is near and the touched memory small.
 */
export function indexAtAngle(angleRad: Float64Array, theta: number, hint: number): number {
  const last = angleRad.length - 1;
  let lo = Math.max(0, Math.min(hint, last - 1));
  if (angleRad[lo]! > theta) lo = 0;
  let hi = lo + 1;
  for (let step = 1; hi < last && angleRad[hi]! <= theta; step *= 2) {
    lo = hi;
    hi = lo + step;
  }
  if (hi > last) hi = last;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (angleRad[mid]! <= theta) lo = mid;
    else hi = mid;
  }
  return lo;
}
