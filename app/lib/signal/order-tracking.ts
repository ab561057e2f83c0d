/**
 * Computed order tracking (Fyfe & Munck, Mech. Syst. Signal Process. 11(2), 1997), crank
 * channel as the reference:
 * 1. crank angle by trapezoidal integration of crank speed (rad/s → rad);
 * 2. optional zero-phase low-pass of both channels (anti-alias, see `chooseAngleGrid`);
 * 3. resampling of both channels to a uniform angle grid of S samples per revolution
 *    (4-point cubic Lagrange interpolation in the sample index);
 * 4. blocks of R revolutions (N = S·R samples, order resolution 1/R) with overlap, a straight
 *    line removed (window-weighted least squares: the speed trend of a run-up or coast-down
 *    inside the block would otherwise leak into orders 1/R…4/R), periodic Hann window,
 *    single-sided 0-peak amplitude (spectrum.ts).
 * Units: angle rad, speed rad/s, time s, orders per crank revolution.
 */
import { createPairAmplitudePlan, type Detrend } from "./spectrum.ts";

/** Crank angle in rad by the trapezoid rule; negative speeds count as standstill (angle never runs back). */
export function integrateAngle(timeS: Float64Array, radS: Float64Array): Float64Array {
  const n = timeS.length;
  const angle = new Float64Array(n);
  for (let i = 1; i < n; i++) {
    const a = Math.max(0, radS[i - 1]!);
    const b = Math.max(0, radS[i]!);
    angle[i] = angle[i - 1]! + 0.5 * (a + b) * (timeS[i]! - timeS[i - 1]!);
  }
  return angle;
}

/** One biquad section, coefficients normalised so a0 = 1. */
export interface Biquad {
  b0: number;
  b1: number;
  b2: number;
  a1: number;
  a2: number;
}

/** 4th-order Butterworth low-pass at `cutoffHz` for sampling rate `sampleRateHz` (bilinear, pre-warped). */
export function butterworthLowpass4(cutoffHz: number, sampleRateHz: number): Biquad[] {
  const k = Math.tan((Math.PI * cutoffHz) / sampleRateHz);
  // Pole-pair quality factors of a 4th-order Butterworth: 1/(2cos(π/8)), 1/(2cos(3π/8)).
  return [Math.PI / 8, (3 * Math.PI) / 8].map((theta) => {
    const q = 1 / (2 * Math.cos(theta));
    const norm = 1 / (1 + k / q + k * k);
    return {
      b0: k * k * norm,
      b1: 2 * k * k * norm,
      b2: k * k * norm,
      a1: 2 * (k * k - 1) * norm,
      a2: (1 - k / q + k * k) * norm,
    };
  });
}

/** Runs one section over x in place, forward or backward, starting in steady state at the first sample. */
function runSection(x: Float64Array, s: Biquad, forward: boolean): void {
  const n = x.length;
  if (n === 0) return;
  const first = forward ? 0 : n - 1;
  const step = forward ? 1 : -1;
  const x0 = x[first]!;
  const dc = (s.b0 + s.b1 + s.b2) / (1 + s.a1 + s.a2);
  let z1 = dc * x0 - s.b0 * x0;
  let z2 = s.b2 * x0 - s.a2 * dc * x0;
  for (let i = first, c = 0; c < n; i += step, c++) {
    const xi = x[i]!;
    const y = s.b0 * xi + z1;
    z1 = s.b1 * xi - s.a1 * y + z2;
    z2 = s.b2 * xi - s.a2 * y;
    x[i] = y;
  }
}

/**
 * Zero-phase filtering (forward then backward, so the magnitude response is squared and the
 * phase cancels). Returns a new array; the input is left untouched.
 */
export function filtfilt(x: Float64Array, sections: readonly Biquad[]): Float64Array {
  const y = Float64Array.from(x);
  for (const s of sections) runSection(y, s, true);
  for (const s of sections) runSection(y, s, false);
  return y;
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

export interface TrackedBlocks {
  revsPerBlock: number;
  /** Order spacing of the stored bins: 1/R. */
  orderStep: number;
  /** Bins stored per block (orders 0 … (binsPerBlock−1)/R). */
  binsPerBlock: number;
  blockCount: number;
  /** Mean engine speed of each block, rad/s (R revolutions over the block's duration). */
  blockRadS: Float64Array;
  blockStartS: Float64Array;
  blockEndS: Float64Array;
  /** 0-peak angular-velocity amplitude in rad/s, block-major: [block·binsPerBlock + bin]. */
  crankAmp: Float64Array;
  gearboxAmp: Float64Array;
  /** Blocks dropped because they ran too slowly for an alias-free grid. */
  droppedSlowBlocks: number;
  /** Coarsest and finest samples per revolution used. */
  samplesPerRevRange: [number, number];
}

/**
 * Interpolates grid samples p = from … N−1 at angles thetaA + p·dTheta of both channels into
 * bufC/bufG (4-point cubic Lagrange in the sample index; the index position of an angle is
 * linear between samples). `start` is a sample index at or before thetaA.
 */
function resampleBlock(
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

/** Index i with angle[i] ≤ theta < angle[i+1] (clamped to 0 … n−2); `hint` is a lower bound. */
function indexAtAngle(angleRad: Float64Array, theta: number, hint: number): number {
  let lo = Math.max(0, Math.min(hint, angleRad.length - 2));
  if (angleRad[lo]! > theta) lo = 0;
  let hi = angleRad.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (angleRad[mid]! <= theta) lo = mid;
    else hi = mid;
  }
  return lo;
}

/**
 * Cuts blocks of R revolutions (hop R·(1−overlap)), resamples both (already filtered) channels
 * of each block to its angle grid and computes the block spectra; the angle-domain signal never
 * sits in memory whole. `angleRad` is the crank angle of each time sample; `topBin` limits the
 * bins kept per block; `minSpeedRadS` is the channel the slowest in-block speed is read from.
 */
export function trackBlocks(args: {
  timeS: Float64Array;
  angleRad: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  grid: AngleGrid;
  revsPerBlock: number;
  overlap: number;
  topBin: number;
  /** What each block loses before the window; "linear" (the default) except for comparisons. */
  detrend?: Detrend;
  onProgress?: (fraction: number) => void;
}): TrackedBlocks {
  const { timeS, angleRad, crankRadS, gearboxRadS, revsPerBlock: R } = args;
  const n = timeS.length;
  const hopRevs = R * (1 - args.overlap);
  const totalRevs = n > 1 ? angleRad[n - 1]! / (2 * Math.PI) : 0;
  const maxBlocks = totalRevs >= R ? Math.floor((totalRevs - R) / hopRevs + 1e-9) + 1 : 0;
  const bins = args.topBin + 1;
  const crankAmp = new Float64Array(maxBlocks * bins);
  const gearboxAmp = new Float64Array(maxBlocks * bins);
  const blockRadS = new Float64Array(maxBlocks);
  const blockStartS = new Float64Array(maxBlocks);
  const blockEndS = new Float64Array(maxBlocks);
  const plans = new Map<number, ReturnType<typeof createPairAmplitudePlan>>();
  let bufC = new Float64Array(0);
  let bufG = new Float64Array(0);
  let ampC = new Float64Array(0);
  let ampG = new Float64Array(0);
  let kept = 0;
  let dropped = 0;
  let sLo = Infinity;
  let sHi = 0;
  let hint = 0;
  let prevS = 0;
  let prevBlock = -2;
  for (let b = 0; b < maxBlocks; b++) {
    const thetaA = b * hopRevs * 2 * Math.PI;
    const thetaE = thetaA + 2 * Math.PI * R;
    const ia = indexAtAngle(angleRad, thetaA, hint);
    const ie = indexAtAngle(angleRad, thetaE, ia);
    hint = ia;
    const tAt = (i: number, theta: number) => {
      const span = angleRad[i + 1]! - angleRad[i]!;
      const u = span > 0 ? Math.min(1, (theta - angleRad[i]!) / span) : 0;
      return timeS[i]! + u * (timeS[i + 1]! - timeS[i]!);
    };
    const startS = tAt(ia, thetaA);
    const endS = tAt(ie, thetaE);
    let minRadS = Infinity;
    for (let i = ia; i <= ie + 1 && i < n; i++) minRadS = Math.min(minRadS, crankRadS[i]!);
    const S = samplesPerRevFor(args.grid, minRadS);
    if (S === null || S * R < 2 * (bins - 1)) {
      dropped++;
      continue;
    }
    const N = S * R;
    let plan = plans.get(N);
    if (!plan) {
      plan = createPairAmplitudePlan(N, { detrend: args.detrend ?? "linear" });
      plans.set(N, plan);
    }
    if (bufC.length < N) {
      prevS = 0;
      bufC = new Float64Array(N);
      bufG = new Float64Array(N);
      ampC = new Float64Array(plan.bins);
      ampG = new Float64Array(plan.bins);
    }
    // With the same grid as the previous block and a whole number of samples per hop, the
    // overlapping part is already resampled: shift it instead of interpolating it again.
    const hopSamples = hopRevs * S;
    let from = 0;
    if (S === prevS && Number.isInteger(hopSamples) && hopSamples < N && prevBlock === b - 1) {
      bufC.copyWithin(0, hopSamples, N);
      bufG.copyWithin(0, hopSamples, N);
      from = N - hopSamples;
    }
    resampleBlock(
      angleRad,
      crankRadS,
      gearboxRadS,
      ia,
      thetaA,
      (2 * Math.PI) / S,
      from,
      N,
      bufC,
      bufG,
    );
    prevS = S;
    prevBlock = b;
    plan.amplitudes(bufC, bufG, ampC, ampG, bins - 1);
    crankAmp.set(ampC.subarray(0, bins), kept * bins);
    gearboxAmp.set(ampG.subarray(0, bins), kept * bins);
    blockRadS[kept] = (2 * Math.PI * R) / Math.max(endS - startS, 1e-12);
    blockStartS[kept] = startS;
    blockEndS[kept] = endS;
    kept++;
    sLo = Math.min(sLo, S);
    sHi = Math.max(sHi, S);
    if (args.onProgress && (b & 255) === 0) args.onProgress(b / maxBlocks);
  }
  return {
    revsPerBlock: R,
    orderStep: 1 / R,
    binsPerBlock: bins,
    blockCount: kept,
    blockRadS: blockRadS.subarray(0, kept),
    blockStartS: blockStartS.subarray(0, kept),
    blockEndS: blockEndS.subarray(0, kept),
    crankAmp: crankAmp.subarray(0, kept * bins),
    gearboxAmp: gearboxAmp.subarray(0, kept * bins),
    droppedSlowBlocks: dropped,
    samplesPerRevRange: kept > 0 ? [sLo, sHi] : [0, 0],
  };
}
