import { describe, expect, it } from "vitest";
import {
  amplitudeAxisLabel,
  amplitudeDb,
  angularAccelerationRadS2,
  convertAmplitude,
  convertSpeed,
  radSToRpm,
  rpmToRadS,
} from "./chart-units";

describe("rpm and rad/s", () => {
  it("1 rpm is 2π/60 rad/s (SI Brochure, 9th ed.: 1 rev = 2π rad, 1 min = 60 s)", () => {
    // Exact by definition; tolerance is floating-point rounding only (1e-15 relative).
    expect(rpmToRadS(1)).toBeCloseTo((2 * Math.PI) / 60, 15);
    // 60 rpm is one revolution per second, i.e. 2π rad/s.
    expect(rpmToRadS(60)).toBeCloseTo(2 * Math.PI, 13);
    // 3000 rpm = 50 rev/s = 100π rad/s.
    expect(rpmToRadS(3000)).toBeCloseTo(100 * Math.PI, 11);
  });

  it("rad/s back to rpm inverts it", () => {
    // 1 rad/s = 60/(2π) rpm ≈ 9.5493 rpm (same definition).
    expect(radSToRpm(1)).toBeCloseTo(60 / (2 * Math.PI), 13);
    for (const rpm of [0, 0.5, 800, 6500]) expect(radSToRpm(rpmToRadS(rpm))).toBeCloseTo(rpm, 10);
  });

  it("speed fluctuations convert the same way", () => {
    expect(convertSpeed(12, "rpm")).toBe(12);
    expect(convertSpeed(12, "rad/s")).toBeCloseTo((12 * 2 * Math.PI) / 60, 13);
  });
});

describe("angular-acceleration amplitude α = Δω·q·Ω", () => {
  /**
   * Analytic signal ω(t) = Ω + Δω·sin(qΩt): its derivative Δω·q·Ω·cos(qΩt) peaks at Δω·q·Ω.
   * We differentiate the signal numerically (central difference over two periods of the order)
   * and compare the largest |dω/dt| with the function — an independent check of the formula.
   */
  function peakDerivative(omegaRadS: number, deltaRadS: number, order: number): number {
    const period = (2 * Math.PI) / (order * omegaRadS);
    const n = 20_000;
    const h = period / n;
    const w = (t: number) => omegaRadS + deltaRadS * Math.sin(order * omegaRadS * t);
    let peak = 0;
    for (let i = 0; i < 2 * n; i++) {
      const t = i * h;
      peak = Math.max(peak, Math.abs((w(t + h) - w(t - h)) / (2 * h)));
    }
    return peak;
  }

  it.each([
    // [engine rpm, amplitude rpm, order] — the firing order of a four-cylinder four-stroke is 2.
    [800, 12, 2],
    [2000, 3.5, 2],
    [1500, 1, 1.5],
    [4500, 0.8, 4],
  ])("at %s rpm, %s rpm 0-peak, order %s", (engineRpm, amplitudeRpm, order) => {
    const expected = peakDerivative(rpmToRadS(engineRpm), rpmToRadS(amplitudeRpm), order);
    const alpha = angularAccelerationRadS2(amplitudeRpm, order, engineRpm);
    // Central difference with 20 000 steps per period: relative error far below 1e-6.
    expect(Math.abs(alpha - expected) / expected).toBeLessThan(1e-6);
    expect(convertAmplitude(amplitudeRpm, "rad/s²", order, engineRpm)).toBe(alpha);
  });

  it("a worked value: 10 rpm at order 2 and 3000 rpm", () => {
    // Δω = 10·2π/60 = π/3 rad/s, Ω = 100π rad/s, q = 2 → α = 200π²/3 ≈ 658.0 rad/s².
    expect(angularAccelerationRadS2(10, 2, 3000)).toBeCloseTo((200 * Math.PI ** 2) / 3, 9);
  });

  it("rpm and rad/s amplitudes do not depend on order or speed", () => {
    expect(convertAmplitude(7, "rpm", 2, 900)).toBe(7);
    expect(convertAmplitude(7, "rad/s", 2, 900)).toBeCloseTo((7 * 2 * Math.PI) / 60, 13);
  });

  it("names the quantity and unit on the axis", () => {
    expect(amplitudeAxisLabel("rpm")).toBe("Amplitude, rpm");
    expect(amplitudeAxisLabel("rad/s")).toBe("Amplitude, rad/s");
    expect(amplitudeAxisLabel("rad/s²")).toMatch(/rad\/s²$/);
  });
});

describe("level in dB re 1 rpm", () => {
  it("is 20·log10(A/1 rpm) (field-quantity level, IEC 60027-3 / ISO 80000-3 convention)", () => {
    expect(amplitudeDb(1)).toBe(0);
    expect(amplitudeDb(10)).toBeCloseTo(20, 12);
    expect(amplitudeDb(0.1)).toBeCloseTo(-20, 12);
    // Doubling an amplitude adds 20·log10(2) ≈ 6.0206 dB.
    expect(amplitudeDb(2) - amplitudeDb(1)).toBeCloseTo(6.0206, 4);
    expect(amplitudeDb(0)).toBe(-Infinity);
  });
});
