import { describe, expect, it } from "vitest";
import { speedPreview } from "./preview-trace";
import type { DriveLog } from "./types";

// rpm = rad/s × 60 / (2π): the definition of the revolution (SI brochure, 9th ed., 2019).
const RAD_S_PER_RPM = (2 * Math.PI) / 60;

function log(n: number, crankRpm: (i: number) => number, sections?: DriveLog["sections"]) {
  const timeS = Float64Array.from({ length: n }, (_, i) => i / 1000);
  return {
    timeS,
    crankRadS: Float64Array.from({ length: n }, (_, i) => crankRpm(i) * RAD_S_PER_RPM),
    gearboxRadS: Float64Array.from({ length: n }, () => 900 * RAD_S_PER_RPM),
    extra: {},
    sampleRateHz: 1000,
    sections,
  } as unknown as DriveLog;
}

describe("speedPreview", () => {
  it("keeps a one-sample spike that bucket means would average away", () => {
    // A 10 000-sample log at 800 rpm with one sample at 2000 rpm: 200 buckets of 50 samples.
    const p = speedPreview(log(10_000, (i) => (i === 4321 ? 2000 : 800)));
    expect(p.timeS.length).toBe(400);
    expect(Math.max(...(p.crankRpm as number[]))).toBeCloseTo(2000, 1);
    expect(Math.min(...(p.crankRpm as number[]))).toBeCloseTo(800, 1);
    expect(new Set(p.gearboxRpm).size).toBe(1);
    for (let i = 1; i < p.timeS.length; i++) expect(p.timeS[i]!).toBeGreaterThan(p.timeS[i - 1]!);
  });

  it("keeps every sample of a short log, and a null between sections", () => {
    const p = speedPreview(
      log(6, (i) => 800 + i, [
        { startIndex: 0, endIndex: 3, startS: 0, endS: 0.002 },
        { startIndex: 3, endIndex: 6, startS: 0.003, endS: 0.005 },
      ]),
    );
    expect(p.timeS).toEqual([0, 0.001, 0.002, 0.0025, 0.003, 0.004, 0.005]);
    expect(p.crankRpm).toEqual([800, 801, 802, null, 803, 804, 805]);
  });
});
