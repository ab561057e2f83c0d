/**
 * Spectral windows and their figures of merit.
 *
 * Convention: windows are *periodic* (DFT-even), the form meant for spectrum analysis:
 * w[n] = 0.5 − 0.5·cos(2πn/N), n = 0…N−1 (Harris 1978, §III). The symmetric form
 * (divisor N−1) is for filter design and is not used here.
 */

/** A window is refused when it is shorter than this (a single sample has no spectrum). */
export const MIN_WINDOW_LENGTH = 2;

function checkLength(length: number): void {
  if (!Number.isInteger(length) || length < MIN_WINDOW_LENGTH) {
    throw new RangeError(`window length must be an integer ≥ ${MIN_WINDOW_LENGTH}, got ${length}`);
  }
}

/**
 * Periodic Hann window of `length` samples (dimensionless weights, 0…1).
 * Throws RangeError for a non-integer length or one below 2: a programming error, not bad input.
 */
export function hannPeriodic(length: number): Float64Array {
  checkLength(length);
  const w = new Float64Array(length);
  const step = (2 * Math.PI) / length;
  for (let n = 0; n < length; n++) w[n] = 0.5 - 0.5 * Math.cos(step * n);
  return w;
}

/** Rectangular (boxcar) window, all ones; the reference the other windows are compared with. */
export function rectangular(length: number): Float64Array {
  checkLength(length);
  return new Float64Array(length).fill(1);
}

/** Sums S1 = Σw and S2 = Σw² (Heinzel et al. 2002, §9), the basis of every correction. */
export function windowSums(w: Float64Array): { s1: number; s2: number } {
  let s1 = 0;
  let s2 = 0;
  for (let n = 0; n < w.length; n++) {
    const v = w[n]!;
    s1 += v;
    s2 += v * v;
  }
  return { s1, s2 };
}

/** Coherent gain Σw / N (dimensionless): the factor a tone on a bin is scaled by. */
export function coherentGain(w: Float64Array): number {
  return windowSums(w).s1 / w.length;
}

/** Equivalent noise bandwidth in bins: N·S2/S1² (Heinzel et al. 2002, eq. 22). */
export function enbwBins(w: Float64Array): number {
  const { s1, s2 } = windowSums(w);
  return (w.length * s2) / (s1 * s1);
}

/**
 * Amplitude correction for a single-sided 0-peak spectrum: 2/S1 for bins 1…N/2−1 (Heinzel et
 * al. 2002, eq. 14 with the one-sided factor 2). DC and, for even N, the Nyquist bin take 1/S1.
 */
export function amplitudeCorrection(w: Float64Array): number {
  return 2 / windowSums(w).s1;
}

/**
 * Scallop loss in dB (positive number) for a tone `offsetBins` away from the bin centre:
 * −20·log10(|W(offset)| / |W(0)|), with W the window's DTFT evaluated directly.
 */
export function scallopLossDb(w: Float64Array, offsetBins = 0.5): number {
  const n = w.length;
  let re = 0;
  let im = 0;
  for (let k = 0; k < n; k++) {
    const phi = (-2 * Math.PI * offsetBins * k) / n;
    re += w[k]! * Math.cos(phi);
    im += w[k]! * Math.sin(phi);
  }
  const s1 = windowSums(w).s1;
  return -20 * Math.log10(Math.hypot(re, im) / s1);
}
