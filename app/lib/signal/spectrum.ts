/**
 * Discrete Fourier transform and single-sided amplitude spectra.
 *
 * Conventions:
 * - DFT X_k = Σ x_n·exp(−2πi·k·n/N), unnormalised (fft.js's forward transform).
 * - Amplitude spectra are single-sided and 0-peak, in the unit of the input: a tone
 *   A·cos(2π·k·n/N + φ) on bin k reads A. Correction 2/Σw for bins 1…⌈N/2⌉−1; DC and (even N)
 *   the Nyquist bin take 1/Σw (Heinzel, Rüdiger, Schilling 2002, §9).
 * - Power-of-two lengths go straight to fft.js (radix-4); any other length goes through
 *   Bluestein's chirp-z algorithm on fft.js, so odd block lengths still cost N·log N.
 * - Before the window a block loses its mean (`detrend: "mean"`) or a straight line
 *   (`"linear"`), see `windowTrend`.
 */
import FFT from "fft.js";
import { hannPeriodic, windowSums } from "./windows.ts";

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

export function nextPowerOfTwo(n: number): number {
  let p = 2;
  while (p < n) p *= 2;
  return p;
}

/** Number of single-sided bins for a length-N real signal: ⌊N/2⌋ + 1. */
export function singleSidedBins(n: number): number {
  return Math.floor(n / 2) + 1;
}

/** A reusable real-input DFT of one length: buffers are allocated once (hot path). */
export interface RealDft {
  readonly size: number;
  /** Writes bins 0…⌊N/2⌋ of DFT(x) as interleaved re, im into `out` (length ≥ 2·(⌊N/2⌋+1)). */
  transform(x: Float64Array, out: Float64Array): void;
}

function radix2Dft(size: number): RealDft {
  const fft = new FFT(size);
  const buf = new Float64Array(2 * size);
  const bins = singleSidedBins(size);
  return {
    size,
    transform(x, out) {
      fft.realTransform(buf, x);
      for (let i = 0; i < 2 * bins; i++) out[i] = buf[i]!;
    },
  };
}

function bluesteinDft(size: number): RealDft {
  const m = nextPowerOfTwo(2 * size - 1);
  const fft = new FFT(m);
  // Chirp w_k = exp(−iπk²/N); k² is reduced mod 2N so the angle stays exact for large k.
  const wr = new Float64Array(size);
  const wi = new Float64Array(size);
  for (let k = 0; k < size; k++) {
    const phi = (Math.PI * ((k * k) % (2 * size))) / size;
    wr[k] = Math.cos(phi);
    wi[k] = -Math.sin(phi);
  }
  const b = new Float64Array(2 * m);
  b[0] = wr[0]!;
  b[1] = -wi[0]!;
  for (let k = 1; k < size; k++) {
    b[2 * k] = b[2 * (m - k)] = wr[k]!;
    b[2 * k + 1] = b[2 * (m - k) + 1] = -wi[k]!;
  }
  const bHat = new Float64Array(2 * m);
  fft.transform(bHat, b);
  const a = new Float64Array(2 * m);
  const aHat = new Float64Array(2 * m);
  const conv = new Float64Array(2 * m);
  const bins = singleSidedBins(size);
  return {
    size,
    transform(x, out) {
      a.fill(0);
      for (let k = 0; k < size; k++) {
        a[2 * k] = x[k]! * wr[k]!;
        a[2 * k + 1] = x[k]! * wi[k]!;
      }
      fft.transform(aHat, a);
      for (let k = 0; k < m; k++) {
        const ar = aHat[2 * k]!;
        const ai = aHat[2 * k + 1]!;
        const br = bHat[2 * k]!;
        const bi = bHat[2 * k + 1]!;
        aHat[2 * k] = ar * br - ai * bi;
        aHat[2 * k + 1] = ar * bi + ai * br;
      }
      fft.inverseTransform(conv, aHat);
      for (let k = 0; k < bins; k++) {
        const cr = conv[2 * k]!;
        const ci = conv[2 * k + 1]!;
        out[2 * k] = cr * wr[k]! - ci * wi[k]!;
        out[2 * k + 1] = cr * wi[k]! + ci * wr[k]!;
      }
    },
  };
}

/** A real-input DFT plan for any length ≥ 2 (RangeError otherwise: a programming error). */
export function createRealDft(size: number): RealDft {
  if (!Number.isInteger(size) || size < 2) {
    throw new RangeError(`DFT length must be an integer ≥ 2, got ${size}`);
  }
  return isPowerOfTwo(size) ? radix2Dft(size) : bluesteinDft(size);
}

/** Full single-sided DFT of a real signal as { re, im } (bins 0…⌊N/2⌋, unnormalised). */
export function realDft(x: Float64Array): { re: Float64Array; im: Float64Array } {
  const plan = createRealDft(x.length);
  const bins = singleSidedBins(x.length);
  const out = new Float64Array(2 * bins);
  plan.transform(x, out);
  const re = new Float64Array(bins);
  const im = new Float64Array(bins);
  for (let k = 0; k < bins; k++) {
    re[k] = out[2 * k]!;
    im[k] = out[2 * k + 1]!;
  }
  return { re, im };
}

/** What is taken out of a block before the window: its mean, or a least-squares straight line. */
export type Detrend = "mean" | "linear";

/**
 * Least-squares straight line a + b·(n − c) through a block, weighted by the window w (the
 * normal equations of weighted least squares; c = Σw·n/Σw makes them uncoupled). Why weighted:
 * the line then fits what the window lets through, and a tone on bin k ≥ 2 is almost orthogonal
 * to it (its projection is the Hann spectrum of a ramp at bin k, ∝ 1/(k(k²−1))), so removing the
 * line leaves the tone as it was. An unweighted fit takes up to 6A/(πk) end to end from a tone of
 * amplitude A, and that line leaks back into the lowest bins (2.9 % of A at bin 1 for k = 16).
 * A pure line is fitted exactly either way. Returns, for a block x, [value at n = 0, slope per
 * sample]: the line is value + slope·n.
 */
export function windowTrend(window: Float64Array): (x: Float64Array) => [number, number] {
  const { s1, c, d } = trendTerms(window);
  return (x) => {
    let sx = 0;
    let snx = 0;
    for (let n = 0; n < window.length; n++) {
      const wx = window[n]! * x[n]!;
      sx += wx;
      snx += wx * (n - c);
    }
    return [sx / s1 - (snx / d) * c, snx / d];
  };
}

/** The window's sums for windowTrend: s1 = Σw, c = Σw·n/Σw, d = Σw·(n − c)². */
function trendTerms(window: Float64Array): { s1: number; c: number; d: number } {
  let s1 = 0;
  let sn = 0;
  for (let n = 0; n < window.length; n++) {
    s1 += window[n]!;
    sn += window[n]! * n;
  }
  const c = sn / s1;
  let d = 0;
  for (let n = 0; n < window.length; n++) d += window[n]! * (n - c) * (n - c);
  return { s1, c, d };
}

/**
 * A reusable amplitude-spectrum plan: removes the block mean (optional) or, with
 * `detrend: "linear"`, the window-weighted least-squares line (then `removeMean` is moot), applies the window,
 * transforms and writes single-sided 0-peak amplitudes (input unit) of bins 0…maxBin.
 */
export interface AmplitudePlan {
  readonly size: number;
  readonly bins: number;
  amplitudes(x: Float64Array, out: Float64Array, maxBin?: number): void;
}

export function createAmplitudePlan(
  size: number,
  options: { window?: Float64Array; removeMean?: boolean; detrend?: Detrend } = {},
): AmplitudePlan {
  const window = options.window ?? hannPeriodic(size);
  if (window.length !== size) {
    throw new RangeError(`window length ${window.length} differs from block length ${size}`);
  }
  const removeMean = options.removeMean ?? true;
  const trend = options.detrend === "linear" ? windowTrend(window) : null;
  const dft = createRealDft(size);
  const bins = singleSidedBins(size);
  const s1 = windowSums(window).s1;
  const work = new Float64Array(size);
  const spec = new Float64Array(2 * bins);
  const nyquist = size % 2 === 0 ? size / 2 : -1;
  return {
    size,
    bins,
    amplitudes(x, out, maxBin = bins - 1) {
      let mean = 0;
      let slope = 0;
      if (trend) [mean, slope] = trend(x);
      else if (removeMean) {
        for (let n = 0; n < size; n++) mean += x[n]!;
        mean /= size;
      }
      for (let n = 0; n < size; n++) work[n] = (x[n]! - mean - slope * n) * window[n]!;
      dft.transform(work, spec);
      const top = Math.min(maxBin, bins - 1);
      for (let k = 0; k <= top; k++) {
        const re = spec[2 * k]!;
        const im = spec[2 * k + 1]!;
        const mag = Math.sqrt(re * re + im * im);
        out[k] = ((k === 0 || k === nyquist ? 1 : 2) * mag) / s1;
      }
    },
  };
}

/**
 * Single-sided 0-peak amplitude spectrum of `x` (input unit), Hann-windowed by default.
 * The mean is kept unless `removeMean` is set, so DC reads the signal's mean value.
 */
export function amplitudeSpectrum(
  x: Float64Array,
  options: { window?: Float64Array; removeMean?: boolean } = {},
): Float64Array {
  const plan = createAmplitudePlan(x.length, { removeMean: false, ...options });
  const out = new Float64Array(plan.bins);
  plan.amplitudes(x, out);
  return out;
}

/**
 * Amplitude spectra of two real signals of the same length from one complex FFT
 * (z = x + i·y; X_k = (Z_k + conj Z_{N−k})/2, Y_k = (Z_k − conj Z_{N−k})/(2i)): the hot path of
 * order tracking, where crank and gearbox blocks always come in pairs. Same conventions as
 * createAmplitudePlan (mean or line removed, window, single-sided 0-peak). Power-of-two sizes only.
 */
export interface PairAmplitudePlan {
  readonly size: number;
  readonly bins: number;
  amplitudes(
    x: Float64Array,
    y: Float64Array,
    outX: Float64Array,
    outY: Float64Array,
    maxBin?: number,
  ): void;
  /**
   * |X_k − Y_k| of the last `amplitudes` call, 0-peak in the input unit: the complex difference
   * of both signals at bin k (k ≤ that call's maxBin). Twist between crank and gearbox needs the
   * phase between them, which the amplitudes alone have lost.
   */
  difference(k: number): number;
}

export function createPairAmplitudePlan(
  size: number,
  options: { detrend?: Detrend } = {},
): PairAmplitudePlan {
  if (!isPowerOfTwo(size))
    throw new RangeError(`paired spectra need a power-of-two length, got ${size}`);
  const window = hannPeriodic(size);
  const trend = options.detrend === "linear" ? trendTerms(window) : null;
  const s1 = windowSums(window).s1;
  const fft = new FFT(size);
  const z = new Float64Array(2 * size);
  const spec = new Float64Array(2 * size);
  const bins = singleSidedBins(size);
  const half = size / 2;
  return {
    size,
    bins,
    amplitudes(x, y, outX, outY, maxBin = bins - 1) {
      let mx = 0;
      let my = 0;
      let bx = 0;
      let by = 0;
      if (trend) {
        // windowTrend of both blocks in one loop (the same sums in the same order).
        const { c, d } = trend;
        let sx = 0;
        let snx = 0;
        let sy = 0;
        let sny = 0;
        for (let n = 0; n < size; n++) {
          const w = window[n]!;
          const wx = w * x[n]!;
          const wy = w * y[n]!;
          sx += wx;
          snx += wx * (n - c);
          sy += wy;
          sny += wy * (n - c);
        }
        bx = snx / d;
        by = sny / d;
        mx = sx / trend.s1 - bx * c;
        my = sy / trend.s1 - by * c;
      } else {
        for (let n = 0; n < size; n++) {
          mx += x[n]!;
          my += y[n]!;
        }
        mx /= size;
        my /= size;
      }
      for (let n = 0; n < size; n++) {
        const w = window[n]!;
        z[2 * n] = (x[n]! - mx - bx * n) * w;
        z[2 * n + 1] = (y[n]! - my - by * n) * w;
      }
      fft.transform(spec, z);
      const top = Math.min(maxBin, bins - 1);
      for (let k = 0; k <= top; k++) {
        const m = k === 0 ? 0 : size - k;
        const a = spec[2 * k]!;
        const b = spec[2 * k + 1]!;
        const c = spec[2 * m]!;
        const d = spec[2 * m + 1]!;
        const scale = (k === 0 || k === half ? 0.5 : 1) / s1;
        outX[k] = Math.sqrt((a + c) * (a + c) + (b - d) * (b - d)) * scale;
        outY[k] = Math.sqrt((a - c) * (a - c) + (b + d) * (b + d)) * scale;
      }
    },
    difference(k) {
      // X_k − Y_k = ((a + c) − (b + d)) + j((b − d) − (c − a)), scaled like the amplitudes.
      const m = k === 0 ? 0 : size - k;
      const a = spec[2 * k]!;
      const b = spec[2 * k + 1]!;
      const c = spec[2 * m]!;
      const d = spec[2 * m + 1]!;
      const scale = (k === 0 || k === half ? 0.5 : 1) / s1;
      return Math.hypot(a + c - b - d, b - d - c + a) * scale;
    },
  };
}
