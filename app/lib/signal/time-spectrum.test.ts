import { describe, expect, it } from "vitest";
import { pickSpectrumSegment, timeSpectrum } from "./time-spectrum.ts";

describe("segment time-domain spectrum (Welch average, Hann, single-sided 0-peak — Heinzel et al. 2002)", () => {
  it("reads a 26.67 Hz tone of 10 rpm on the crank and 2 rpm on the gearbox within 2 % (tone between bins: Hann scallop ≤ 1.42 dB, so read the nearest bins' power sum)", () => {
    const fs = 2000;
    const n = fs * 20;
    const rad = (rpm: number) => (rpm * 2 * Math.PI) / 60;
    const timeS = Float64Array.from({ length: n }, (_, i) => i / fs);
    const f = 26.6667;
    const crank = Float64Array.from(
      timeS,
      (t) => rad(800) + rad(10) * Math.cos(2 * Math.PI * f * t),
    );
    const gear = Float64Array.from(
      timeS,
      (t) => rad(800) + rad(2) * Math.cos(2 * Math.PI * f * t + 1),
    );
    const seg = { kind: "idle" as const, startS: 0, endS: 20, meanRpm: 800 };
    const s = timeSpectrum({
      timeS,
      crankRadS: crank,
      gearboxRadS: gear,
      sampleRateHz: fs,
      segment: seg,
      topOrder: 8,
    })!;
    let k = 0;
    s.frequencyHz.forEach((x, i) => {
      if (Math.abs(x - f) < Math.abs(s.frequencyHz[k]! - f)) k = i;
    });
    // Hann: the power sum of the two bins around a tone, times 2/3, gives back A² (ENBW 1.5; Harris 1978) — use the peak plus neighbours.
    const pc = s.crankRpm[k - 1]! ** 2 + s.crankRpm[k]! ** 2 + s.crankRpm[k + 1]! ** 2;
    const pg = s.gearboxRpm[k - 1]! ** 2 + s.gearboxRpm[k]! ** 2 + s.gearboxRpm[k + 1]! ** 2;
    expect(Math.abs(Math.sqrt(pc / 1.5) / 10 - 1)).toBeLessThan(0.02);
    expect(Math.abs(Math.sqrt(pg / 1.5) / 2 - 1)).toBeLessThan(0.02);
    expect(s.frequencyHz.length).toBeLessThanOrEqual(2048);
    expect(s.frequencyHz[s.frequencyHz.length - 1]!).toBeLessThanOrEqual(
      1.5 * 8 * (800 / 60) + s.frequencyResolutionHz,
    );
  });
  it("picks the longest idle or steady segment", () => {
    const pick = pickSpectrumSegment([
      { kind: "idle", startS: 0, endS: 5, meanRpm: 800 },
      { kind: "run-up", startS: 5, endS: 30, meanRpm: 2000 },
      { kind: "steady", startS: 30, endS: 40, meanRpm: 3000 },
    ]);
    expect(pick?.kind).toBe("steady");
  });
});
