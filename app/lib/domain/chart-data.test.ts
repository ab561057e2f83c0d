import { describe, expect, it } from "vitest";
import { chartData, MAP_ROWS } from "./chart-data";
import type { AnalysisResult } from "../signal/result-schema";

// A constructed result whose chart data is known by hand. The isolation model check uses the
// base-excitation transmissibility T(r) = √((1 + (2ζr)²)/((1 − r²)² + (2ζr)²)) (Harris' Shock
// and Vibration Handbook, ch. 30), written out here independently of two-mass-model.ts.
const T = (r: number, z: number) =>
  Math.sqrt((1 + (2 * z * r) ** 2) / ((1 - r * r) ** 2 + (2 * z * r) ** 2));

function result(overrides: Partial<AnalysisResult> = {}): AnalysisResult {
  return {
    firingOrder: 2,
    sampleRateHz: 2000,
    durationS: 30,
    settings: {
      cylinders: 4,
      stroke: 4,
      firingOrder: 2,
      samplesPerRev: 64,
      samplesPerRevMin: 32,
      samplesPerRevFixed: false,
      revsPerBlock: 2,
      overlap: 0.5,
      binRpm: 50,
      rattleLimitRadS2: 500,
      orderResolution: 0.5,
      topOrder: 2,
      lowPassHz: null,
      minValidRpm: 20,
      window: "hann-periodic",
    },
    blocks: 4,
    isolation: [
      { rpm: 1000, dB: 12.4, blocks: 3, aboveNoise: true },
      { rpm: 1050, dB: 13.1, blocks: 2, aboveNoise: false },
    ],
    orderCurves: [{ order: 2, points: [{ rpm: 1000, crankRpm: 30, gearboxRpm: 7.2, blocks: 3 }] }],
    // Columns: orders 0, 0.5, 1, 1.5, 2. Rows 0 and 1 share the 1000 rpm bin.
    orderMap: {
      orderStep: 0.5,
      orderCount: 5,
      blocksPerRow: 1,
      blockRpm: [1001, 1010, 1500, 800],
      timeS: [1, 2, 3, 12],
      crankRpm: [
        [0, 0, 1, 0, 3],
        [0, 0, 1, 0, 4],
        [0, 0, 2, 0, 6],
        [0, 0, 0, 0, 10],
      ],
      gearboxRpm: [
        [0, 0, 0, 0, 1],
        [0, 0, 0, 0, 1],
        [0, 0, 0, 0, 2],
        [0, 0, 0, 0, 5],
      ],
    },
    segments: [
      { kind: "run-up", startS: 0, endS: 10, meanRpm: 1200 },
      { kind: "idle", startS: 10, endS: 30, meanRpm: 800 },
    ],
    idle: {
      meanRpm: 800,
      gearboxAngAccelRadS2: 100,
      gearboxAngAccelPeakRadS2: 150,
      limitRadS2: 500,
      verdict: "ok",
      idleDurationS: 20,
      blocks: 1,
      spans: [],
      accelTrace: { timeS: [11, 12], radS2: [90, 150] },
    },
    resonance: null,
    model: {
      naturalFrequencyHz: 12,
      dampingRatio: 0.1,
      resonanceRpm: 360,
      rmsErrorDb: 0.2,
      bins: 2,
    },
    timeSpectrum: null,
    speedTrace: null,
    warnings: [],
    ...overrides,
  };
}

describe("chart data", () => {
  it("keeps the isolation and order curves exactly as the result has them", () => {
    const c = chartData(result());
    expect(c.isolation.rpm).toEqual([1000, 1050]);
    expect(c.isolation.dB).toEqual([12.4, 13.1]);
    expect(c.isolation.aboveNoise).toEqual([true, false]);
    expect(c.orderCurves).toEqual([{ order: 2, rpm: [1000], crankRpm: [30], gearboxRpm: [7.2] }]);
  });

  it("adds the fitted model's isolation, −20·log10 T(r) with r = (rpm/60 · q)/fn", () => {
    const c = chartData(result());
    const r = ((1000 / 60) * 2) / 12;
    expect(c.isolation.modelDb![0]).toBeCloseTo(-20 * Math.log10(T(r, 0.1)), 2);
    expect(chartData(result({ model: null })).isolation.modelDb).toBeNull();
  });

  it("power-averages the order map's rows into engine-speed bins (RMS of 3 and 4 is √12.5)", () => {
    const c = chartData(result());
    expect(c.orderMap.rowRpm).toBe(50);
    expect(c.orderMap.rpm).toEqual([800, 1000, 1500]);
    expect(c.orderMap.crankRpm[1]![4]).toBeCloseTo(Math.sqrt((9 + 16) / 2), 2);
    expect(c.orderMap.crankRpm[2]).toEqual([0, 0, 2, 0, 6]);
  });

  it("takes the firing-order column of the rows inside idle segments for the fluctuation trace", () => {
    const c = chartData(result());
    expect(c.idle!.firingOrderTrace).toEqual({ timeS: [12], crankRpm: [10], gearboxRpm: [5] });
    expect(c.idle!.accelTrace).toEqual({ timeS: [11, 12], radS2: [90, 150] });
    expect(chartData(result({ idle: null })).idle).toBeNull();
  });

  it("widens the order-map rows so a long run-up keeps at most MAP_ROWS of them", () => {
    const n = 2000;
    const rpm = Array.from({ length: n }, (_, i) => 800 + i * 3);
    const rows = rpm.map(() => [0, 0, 1, 0, 2]);
    const c = chartData(
      result({
        orderMap: {
          orderStep: 0.5,
          orderCount: 5,
          blocksPerRow: 1,
          blockRpm: rpm,
          timeS: rpm.map((_, i) => i),
          crankRpm: rows,
          gearboxRpm: rows,
        },
      }),
    );
    expect(c.orderMap.rpm.length).toBeLessThanOrEqual(MAP_ROWS);
    expect(c.orderMap.rowRpm % 50).toBe(0);
    expect(c.orderMapByTime.timeS.length).toBeLessThanOrEqual(MAP_ROWS);
    // Equal rows stay equal after averaging.
    expect(c.orderMap.crankRpm.every((r) => r[4] === 2)).toBe(true);
  });
});
