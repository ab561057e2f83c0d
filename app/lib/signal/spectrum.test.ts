import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import {
  amplitudeSpectrum,
  createAmplitudePlan,
  createPairAmplitudePlan,
  createRealDft,
  realDft,
  windowTrend,
} from "./spectrum.ts";
import { hannPeriodic, rectangular } from "./windows.ts";

// fft-js (npm, Vail Systems) is an independent radix-2 Cooley–Tukey FFT; it has no types.
const require = createRequire(import.meta.url);
const fftJs = require("fft-js") as { fft: (x: number[]) => [number, number][] };

/** Seeded uniform random numbers in [−1, 1) (LCG, Numerical Recipes constants). */
function random(n: number, seed = 12345): Float64Array {
  let s = seed >>> 0;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    out[i] = s / 2 ** 31 - 1;
  }
  return out;
}

/** The DFT definition, O(N²): X_k = Σ x_n exp(−2πi kn/N). */
function dft(x: Float64Array): { re: Float64Array; im: Float64Array } {
  const n = x.length;
  const bins = Math.floor(n / 2) + 1;
  const re = new Float64Array(bins);
  const im = new Float64Array(bins);
  for (let k = 0; k < bins; k++) {
    for (let j = 0; j < n; j++) {
      const phi = (-2 * Math.PI * ((k * j) % n)) / n;
      re[k] = re[k]! + x[j]! * Math.cos(phi);
      im[k] = im[k]! + x[j]! * Math.sin(phi);
    }
  }
  return { re, im };
}

describe("DFT", () => {
  it("fft.js agrees with fft-js on random input, N = 1024 (independent npm FFT; max error 1e-9 · N)", () => {
    const x = random(1024);
    const ours = realDft(x);
    const ref = fftJs.fft(Array.from(x));
    for (let k = 0; k < ours.re.length; k++) {
      expect(Math.abs(ours.re[k]! - ref[k]![0])).toBeLessThan(1e-9 * 1024);
      expect(Math.abs(ours.im[k]! - ref[k]![1])).toBeLessThan(1e-9 * 1024);
    }
  });

  for (const n of [2, 3, 8, 12, 17, 100, 255, 256]) {
    it(`agrees with the O(N²) DFT definition for N = ${n} (odd, even, non-power-of-two via Bluestein; 1e-9 · N)`, () => {
      const x = random(n, n);
      const ours = realDft(x);
      const ref = dft(x);
      for (let k = 0; k < ref.re.length; k++) {
        expect(Math.abs(ours.re[k]! - ref.re[k]!)).toBeLessThan(1e-9 * n);
        expect(Math.abs(ours.im[k]! - ref.im[k]!)).toBeLessThan(1e-9 * n);
      }
    });
  }

  for (const n of [512, 511]) {
    it(`Parseval: Σx² = (1/N)Σ|X|² for N = ${n} (textbook identity; relative 1e-12)`, () => {
      const x = random(n, 7);
      const { re, im } = realDft(x);
      let time = 0;
      for (const v of x) time += v * v;
      // Full two-sided sum from the one-sided half: bins 1…⌈N/2⌉−1 appear twice.
      let freq = 0;
      for (let k = 0; k < re.length; k++) {
        const p = re[k]! ** 2 + im[k]! ** 2;
        freq += k === 0 || (n % 2 === 0 && k === n / 2) ? p : 2 * p;
      }
      expect(Math.abs(freq / n / time - 1)).toBeLessThan(1e-12);
    });
  }

  it("refuses lengths below 2 and non-integers", () => {
    expect(() => createRealDft(1)).toThrow(RangeError);
    expect(() => createRealDft(6.5)).toThrow(RangeError);
    expect(() => createPairAmplitudePlan(100)).toThrow(RangeError);
    expect(() => createAmplitudePlan(64, { window: hannPeriodic(32) })).toThrow(RangeError);
  });
});

describe("single-sided 0-peak amplitude (Heinzel et al. 2002, §9)", () => {
  const tone = (n: number, k: number, a: number, phase = 0.3, dc = 0) =>
    Float64Array.from(
      { length: n },
      (_, j) => dc + a * Math.cos((2 * Math.PI * k * j) / n + phase),
    );

  for (const n of [1024, 1000, 999]) {
    it(`a Hann-windowed tone on bin 37 reads its amplitude to 0.1 %, N = ${n} (Heinzel 2002: 2·|X_k|/Σw)`, () => {
      const a = amplitudeSpectrum(tone(n, 37, 2.5));
      expect(Math.abs(a[37]! / 2.5 - 1)).toBeLessThan(1e-3);
    });
  }

  it("a tone half a bin off reads 1.42 dB low through Hann (Harris 1978, Table 1 [memory]; ±0.01 dB)", () => {
    const n = 4096;
    const x = Float64Array.from({ length: n }, (_, j) => Math.cos((2 * Math.PI * 100.5 * j) / n));
    const a = amplitudeSpectrum(x);
    expect(Math.abs(-20 * Math.log10(Math.max(a[100]!, a[101]!)) - 1.42)).toBeLessThan(0.01);
  });

  it("DC reads the mean and the Nyquist bin reads its amplitude, without the factor 2 (Heinzel 2002)", () => {
    const n = 64;
    const x = Float64Array.from({ length: n }, (_, j) => 3 + 0.5 * (j % 2 === 0 ? 1 : -1));
    const a = amplitudeSpectrum(x, { window: rectangular(n) });
    expect(a[0]).toBeCloseTo(3, 12);
    expect(a[32]).toBeCloseTo(0.5, 12);
    const h = amplitudeSpectrum(x); // Hann: the DC of a constant reads the constant too
    expect(h[0]).toBeCloseTo(3, 12);
  });

  it("removing the mean empties the DC bin and leaves the tone (plan option)", () => {
    const n = 256;
    const plan = createAmplitudePlan(n);
    const out = new Float64Array(plan.bins);
    plan.amplitudes(tone(n, 10, 1, 0, 5), out);
    expect(out[0]).toBeLessThan(1e-12);
    expect(out[10]).toBeCloseTo(1, 10);
  });

  it("the paired plan (one complex FFT for two signals) matches two single plans (algebraic identity; 1e-10)", () => {
    const n = 512;
    const x = random(n, 3);
    const y = random(n, 4);
    const single = createAmplitudePlan(n);
    const ax = new Float64Array(single.bins);
    const ay = new Float64Array(single.bins);
    single.amplitudes(x, ax);
    single.amplitudes(y, ay);
    const pair = createPairAmplitudePlan(n);
    const px = new Float64Array(pair.bins);
    const py = new Float64Array(pair.bins);
    pair.amplitudes(x, y, px, py);
    for (let k = 0; k < pair.bins; k++) {
      expect(Math.abs(px[k]! - ax[k]!)).toBeLessThan(1e-10);
      expect(Math.abs(py[k]! - ay[k]!)).toBeLessThan(1e-10);
    }
  });
});

describe("removing a straight line before the window (detrend: linear)", () => {
  const n = 1024;
  const sine = (k: number, a = 1) =>
    Float64Array.from({ length: n }, (_, j) => a * Math.sin((2 * Math.PI * k * j) / n));

  it("adding any straight line changes nothing, and the tone reads its amplitude (least squares is linear and reproduces a line under any weights; 1e-9)", () => {
    const plan = createAmplitudePlan(n, { detrend: "linear" });
    const out = new Float64Array(plan.bins);
    plan.amplitudes(
      sine(37, 2.5).map((v, j) => v + 40 - 0.03 * j),
      out,
    );
    const ref = new Float64Array(plan.bins);
    plan.amplitudes(sine(37, 2.5), ref);
    for (let k = 0; k < plan.bins; k++) expect(Math.abs(out[k]! - ref[k]!)).toBeLessThan(1e-9);
    expect(out[0]!).toBeLessThan(1e-9);
    expect(Math.abs(out[37]! / 2.5 - 1)).toBeLessThan(1e-4);
  });

  it("a tone on bin 16 leaves bin 1 below 0.1 % of its amplitude, where an unweighted line fit leaves 2.8 % (windowed-ramp DFT worked out by hand [computed]: 3/(4π) · 6/(16π) ≈ 0.028)", () => {
    const x = sine(16);
    const plan = createAmplitudePlan(n, { detrend: "linear" });
    const out = new Float64Array(plan.bins);
    plan.amplitudes(x, out);
    expect(out[1]!).toBeLessThan(1e-3);
    expect(Math.abs(out[16]! - 1)).toBeLessThan(1e-4);
    // The same line through the block by ordinary (unweighted) least squares, then the window.
    const c = (n - 1) / 2;
    let sxy = 0;
    let sxx = 0;
    x.forEach((v, j) => {
      sxy += (j - c) * v;
      sxx += (j - c) ** 2;
    });
    const plain = x.map((v, j) => v - (sxy / sxx) * (j - c));
    const ref = createAmplitudePlan(n);
    const outRef = new Float64Array(ref.bins);
    ref.amplitudes(plain, outRef);
    expect(Math.abs(outRef[1]! / ((3 / (4 * Math.PI)) * (6 / (16 * Math.PI))) - 1)).toBeLessThan(
      0.02,
    );
  });

  it("the weighted fit returns the line's own intercept and slope (1e-9)", () => {
    const fit = windowTrend(hannPeriodic(n));
    const [a, b] = fit(Float64Array.from({ length: n }, (_, j) => 3 + 0.25 * j));
    expect(Math.abs(a - 3)).toBeLessThan(1e-9);
    expect(Math.abs(b - 0.25)).toBeLessThan(1e-9);
  });

  it("the paired plan removes the same line as the single plan (algebraic identity; 1e-10)", () => {
    const x = random(n, 5).map((v, j) => v + 0.01 * j);
    const y = random(n, 6).map((v, j) => v - 0.02 * j);
    const single = createAmplitudePlan(n, { detrend: "linear" });
    const ax = new Float64Array(single.bins);
    const ay = new Float64Array(single.bins);
    single.amplitudes(x, ax);
    single.amplitudes(y, ay);
    const pair = createPairAmplitudePlan(n, { detrend: "linear" });
    const px = new Float64Array(pair.bins);
    const py = new Float64Array(pair.bins);
    pair.amplitudes(x, y, px, py);
    for (let k = 0; k < pair.bins; k++) {
      expect(Math.abs(px[k]! - ax[k]!)).toBeLessThan(1e-10);
      expect(Math.abs(py[k]! - ay[k]!)).toBeLessThan(1e-10);
    }
  });
});
