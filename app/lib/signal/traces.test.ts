import { describe, expect, it } from "vitest";
import { envelopeMax, speedTrace, TRACE_POINTS } from "./traces.ts";

// 1 rad/s = 60/(2π) rpm (SI Brochure, 9th ed., 2019: the radian and the revolution).
const RPM = 60 / (2 * Math.PI);

describe("speed trace", () => {
  it("keeps a linear ramp on the ramp (the mean of a linear function is its value at the mean time)", () => {
    const n = 100_003;
    const t = new Float64Array(n);
    const c = new Float64Array(n);
    const g = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      t[i] = i / 1000;
      c[i] = 80 + 10 * t[i]!;
      g[i] = 0.5 * c[i]!;
    }
    const s = speedTrace(t, c, g);
    expect(s.timeS.length).toBeLessThanOrEqual(TRACE_POINTS);
    expect(s.timeS.length).toBeGreaterThan(TRACE_POINTS - 10);
    for (let i = 0; i < s.timeS.length; i++) {
      expect(s.crankRpm[i]!).toBeCloseTo((80 + 10 * s.timeS[i]!) * RPM, 0);
      expect(s.gearboxRpm[i]!).toBeCloseTo(0.5 * (80 + 10 * s.timeS[i]!) * RPM, 0);
    }
    expect(s.timeS[0]).toBeGreaterThanOrEqual(0);
    expect(s.timeS.at(-1)).toBeLessThanOrEqual(t[n - 1]!);
  });

  it("keeps every sample of a short log", () => {
    const t = Float64Array.from([0, 0.1, 0.2]);
    const s = speedTrace(t, Float64Array.from([10, 20, 30]), Float64Array.from([1, 2, 3]));
    expect(s.samplesPerPoint).toBe(1);
    expect(s.crankRpm).toEqual([10, 20, 30].map((v) => Math.round(v * RPM * 10) / 10));
  });
});

describe("envelope", () => {
  it("never loses the largest value of a bucket, so a peak above a limit stays visible", () => {
    const n = 50_000;
    const t = Array.from({ length: n }, (_, i) => i * 1e-3);
    const v = Array.from({ length: n }, (_, i) => Math.abs(Math.sin(i * 0.37)) * 100);
    v[31_337] = 999;
    const e = envelopeMax(t, v, 700);
    expect(e.value.length).toBeLessThanOrEqual(700);
    expect(Math.max(...e.value)).toBe(999);
    expect(e.timeS[e.value.indexOf(999)]).toBeCloseTo(31.337, 3);
  });
});
