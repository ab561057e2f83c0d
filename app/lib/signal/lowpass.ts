/**
 * The zero-phase anti-alias low-pass of order tracking (order-tracking.ts, step 2) and of the
 * rattle check (rattle.ts): a 4th-order Butterworth as two biquads by the bilinear transform
 * with pre-warping, run forward then backward. Units: Hz for cutoff and sampling rate; the
 * filtered signal keeps its own unit.
 */
import { float64Array } from "./shared-arrays.ts";

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

/** A section's state (z1, z2) in steady state for a constant input x0 (transposed direct form II). */
function steadyState(s: Biquad, x0: number): [number, number] {
  const dc = (s.b0 + s.b1 + s.b2) / (1 + s.a1 + s.a2);
  return [dc * x0 - s.b0 * x0, s.b2 * x0 - s.a2 * dc * x0];
}

/** Runs one section over x in place, forward or backward, starting in steady state at the first sample. */
function runSection(x: Float64Array, s: Biquad, forward: boolean): void {
  const n = x.length;
  if (n === 0) return;
  const first = forward ? 0 : n - 1;
  const step = forward ? 1 : -1;
  let [z1, z2] = steadyState(s, x[first]!);
  for (let i = first, c = 0; c < n; i += step, c++) {
    const xi = x[i]!;
    const y = s.b0 * xi + z1;
    z1 = s.b1 * xi - s.a1 * y + z2;
    z2 = s.b2 * xi - s.a2 * y;
    x[i] = y;
  }
}

/**
 * Two sections in one pass, the second fed sample by sample from the first: the same operations
 * in the same order as two runSection calls, so the same values, with one sweep over x instead
 * of two (the 4th-order low-pass is two sections; this halved filtfilt's time on the bench log).
 */
function runPair(x: Float64Array, s: Biquad, t: Biquad, forward: boolean): void {
  const n = x.length;
  if (n === 0) return;
  const first = forward ? 0 : n - 1;
  const step = forward ? 1 : -1;
  let [z1, z2] = steadyState(s, x[first]!);
  // The second section starts in steady state at the first section's first output.
  let [w1, w2] = steadyState(t, s.b0 * x[first]! + z1);
  const { b0, b1, b2, a1, a2 } = s;
  const { b0: c0, b1: c1, b2: c2, a1: d1, a2: d2 } = t;
  for (let i = first, c = 0; c < n; i += step, c++) {
    const xi = x[i]!;
    const y = b0 * xi + z1;
    z1 = b1 * xi - a1 * y + z2;
    z2 = b2 * xi - a2 * y;
    const v = c0 * y + w1;
    w1 = c1 * y - d1 * v + w2;
    w2 = c2 * y - d2 * v;
    x[i] = v;
  }
}

/**
 * Zero-phase filtering (forward then backward, so the magnitude response is squared and the
 * phase cancels). Returns a new array, or `out` (as long as x) filled; x is left untouched.
 */
export function filtfilt(
  x: Float64Array,
  sections: readonly Biquad[],
  out?: Float64Array,
): Float64Array {
  const y = out ?? float64Array(x.length); // shared memory for the block helper, when it runs
  y.set(x);
  const [s, t] = sections;
  if (sections.length === 2 && s && t) {
    runPair(y, s, t, true);
    runPair(y, s, t, false);
    return y;
  }
  for (const s of sections) runSection(y, s, true);
  for (const s of sections) runSection(y, s, false);
  return y;
}
