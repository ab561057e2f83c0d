import { describe, expect, it } from "vitest";
import {
  fitTwoMassModel,
  modelIsolationDb,
  transferFunction,
  transmissibility,
} from "./two-mass-model.ts";

describe("base-excited transmissibility", () => {
  // Harris' Shock and Vibration Handbook ch. 30; Ogata, System Dynamics 4th ed., eq. 9-14. Values [computed] in docs/references.md.
  it("T(3, 0) = 0.125, T(3, 0.1) = 0.1454, T(1, 0.1) = 5.099 (Harris ch. 30 / Ogata eq. 9-14; 4 decimals)", () => {
    expect(transmissibility(3, 0)).toBeCloseTo(0.125, 4);
    expect(transmissibility(3, 0.1)).toBeCloseTo(0.1454, 4);
    expect(transmissibility(1, 0.1)).toBeCloseTo(5.099, 3);
  });
  it("T = 1 at r = √2 for any damping (property of the formula; 1e-12)", () => {
    for (const z of [0, 0.01, 0.1, 0.5, 1, 3])
      expect(transmissibility(Math.SQRT2, z)).toBeCloseTo(1, 12);
  });
  it("as isolation: +18.06 dB, +16.75 dB, −14.15 dB (REFERENCES: T(3,0) = −18.06 dB, T(3,0.1) = −16.75 dB, T(1,0.1) = +14.15 dB; 0.005 dB)", () => {
    // modelIsolationDb is attenuation (positive), the negative of the transmissibility level.
    const fn = 10; // Hz; at order 2, r = 3 ↔ 900 rpm, r = 1 ↔ 300 rpm
    expect(modelIsolationDb(900, 2, fn, 0)).toBeCloseTo(18.06, 2);
    expect(modelIsolationDb(900, 2, fn, 0.1)).toBeCloseTo(16.75, 2);
    expect(modelIsolationDb(300, 2, fn, 0.1)).toBeCloseTo(-14.15, 2);
  });
  it("H(ω) = (k + jωc)/(k − J2ω² + jωc) has |H| = T and a lag of 90° + atan(2ζ) at r = 1 (REFERENCES base-excitation form)", () => {
    const k = 400;
    const j2 = 0.06;
    const zeta = 0.1;
    const wn = Math.sqrt(k / j2);
    const c = 2 * zeta * Math.sqrt(k * j2);
    for (const r of [0.3, 1, 2.5]) {
      const w = r * wn;
      const num = { re: k, im: w * c };
      const den = { re: k - j2 * w * w, im: w * c };
      const mag = Math.hypot(num.re, num.im) / Math.hypot(den.re, den.im);
      const ph = Math.atan2(num.im, num.re) - Math.atan2(den.im, den.re);
      const h = transferFunction(r, zeta);
      expect(h.magnitude).toBeCloseTo(mag, 12);
      expect(h.phaseRad).toBeCloseTo(ph, 12);
    }
  });
});

describe("two-mass model fit", () => {
  const curve = (fn: number, z: number, rpms: number[]) =>
    rpms.map((rpm) => ({ rpm, dB: modelIsolationDb(rpm, 2, fn, z) }));
  it("recovers ωn and ζ from a curve made by the formula (analytic; 0.5 %)", () => {
    const rpms = Array.from({ length: 50 }, (_, i) => 300 + 50 * i);
    const out = fitTwoMassModel(curve(14.2, 0.07, rpms), 2);
    expect(out.ok).toBe(true);
    if (!out.ok) return;
    expect(Math.abs(out.fit.naturalFrequencyHz / 14.2 - 1)).toBeLessThan(0.005);
    expect(Math.abs(out.fit.dampingRatio / 0.07 - 1)).toBeLessThan(0.005);
  });
  it("refuses too few bins, a narrow span and a curve far above resonance", () => {
    expect(fitTwoMassModel(curve(14, 0.1, [800, 850, 900]), 2).ok).toBe(false);
    expect(fitTwoMassModel(curve(14, 0.1, [800, 810, 820, 830, 840, 850, 860]), 2).ok).toBe(false);
    const far = Array.from({ length: 20 }, (_, i) => 3000 + 100 * i);
    expect(fitTwoMassModel(curve(5, 0.1, far), 2).ok).toBe(false);
  });
});
