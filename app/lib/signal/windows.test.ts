import { describe, expect, it } from "vitest";
import {
  amplitudeCorrection,
  coherentGain,
  enbwBins,
  hannPeriodic,
  rectangular,
  scallopLossDb,
  windowSums,
} from "./windows.ts";

describe("periodic Hann window", () => {
  // Harris 1978, Table 1 [memory in docs/references.md; the computation below agrees with it].
  for (const n of [64, 1000, 1001, 4096]) {
    it(`coherent gain 0.50 and ENBW 1.50 bins at N = ${n} (Harris 1978, Table 1 [memory]; tolerance 1e-12)`, () => {
      const w = hannPeriodic(n);
      expect(coherentGain(w)).toBeCloseTo(0.5, 12);
      expect(enbwBins(w)).toBeCloseTo(1.5, 12);
    });
  }

  it("scallop loss 1.42 dB for a tone half a bin off (Harris 1978, Table 1 [memory]; ±0.005 dB)", () => {
    expect(Math.abs(scallopLossDb(hannPeriodic(4096), 0.5) - 1.42)).toBeLessThan(0.005);
  });

  it("rectangular window scallop loss 3.92 dB (Harris 1978, Table 1 [memory]; ±0.005 dB)", () => {
    expect(Math.abs(scallopLossDb(rectangular(4096), 0.5) - 3.92)).toBeLessThan(0.005);
  });

  it("amplitude correction 2.000 and energy correction 1.633 per unit coherent sum (REFERENCES [computed])", () => {
    const n = 2048;
    const w = hannPeriodic(n);
    const { s2 } = windowSums(w);
    expect(amplitudeCorrection(w) * n).toBeCloseTo(4.0, 10); // 2 (single-sided) × 2.000
    expect(Math.sqrt(n / s2)).toBeCloseTo(1.633, 3);
  });

  it("is periodic: w[0] = 0 and w[N/2] = 1 for even N; symmetric about N/2 for odd N (definition)", () => {
    const even = hannPeriodic(8);
    expect(even[0]).toBe(0);
    expect(even[4]).toBeCloseTo(1, 15);
    const odd = hannPeriodic(9);
    for (let k = 1; k < 9; k++) expect(odd[k]).toBeCloseTo(odd[9 - k]!, 14);
  });

  it("refuses lengths below 2 and non-integers", () => {
    expect(() => hannPeriodic(1)).toThrow(RangeError);
    expect(() => hannPeriodic(0)).toThrow(RangeError);
    expect(() => hannPeriodic(10.5)).toThrow(RangeError);
    expect(() => rectangular(-3)).toThrow(RangeError);
  });
});
