import { describe, expect, it } from "vitest";
import { chartData, endStopMargin, eventNames, MAP_ROWS, unresolvedBelow } from "./chart-data";
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

  it("passes events, the twist curve and the filter's spans through; null for older results", () => {
    const start = {
      kind: "start" as const,
      startS: 0.5,
      endS: 6.5,
      resonanceRpm: 390,
      peakAmplificationDb: 10.9,
      timeNearResonanceS: 1.2,
      peakGearboxAngAccelRadS2: 850,
      twistPeakToPeakDeg: 14.2,
    };
    const c = chartData(
      result({
        isolation: [
          { rpm: 400, dB: -10.9, blocks: 6, aboveNoise: true, method: "filter" },
          { rpm: 1000, dB: 12.4, blocks: 3, aboveNoise: true, method: "blocks" },
        ],
        events: [start],
        twist: {
          curve: [
            { rpm: 400, deg: 2.5, blocks: 6, method: "filter" },
            { rpm: 1000, deg: 0.4, blocks: 3, method: "blocks" },
          ],
          driftCutoffHz: 0.5,
        },
        transient: {
          slewThresholdRpmS: 300,
          filter: { method: "vold-kalman-2", poles: 2, bandwidthOrders: 0.25, minBandwidthHz: 1 },
          spans: [{ kind: "start", startS: 0.5, endS: 6.5 }],
          lowestResolvedRpm: 250,
          unresolvedReason:
            "Below 250 rpm the firing order is under the filter's lowest bandwidth.",
          blocks: [
            {
              startS: 1,
              endS: 1.5,
              rpm: 300,
              revs: 2,
              orderResolution: 0.5,
              crankRadS: 3,
              gearboxRadS: 6,
            },
          ],
        },
      }),
    );
    expect(c.isolation.method).toEqual(["filter", "blocks"]);
    expect(c.events).toEqual([start]);
    expect(c.twist).toEqual({
      rpm: [400, 1000],
      deg: [2.5, 0.4],
      blocks: [6, 3],
      method: ["filter", "blocks"],
      driftCutoffHz: 0.5,
    });
    // The per-block list stays in the result JSON: the charts need only the spans.
    expect(c.transient).not.toHaveProperty("blocks");
    expect(c.transient!.spans).toEqual([{ kind: "start", startS: 0.5, endS: 6.5 }]);
    expect(unresolvedBelow(c.transient)).toEqual({
      rpm: 250,
      reason: "Below 250 rpm the firing order is under the filter's lowest bandwidth.",
    });

    const old = chartData(result());
    expect(old.isolation.method).toEqual(["blocks", "blocks"]);
    expect([old.events, old.twist, old.transient, unresolvedBelow(old.transient)]).toEqual([
      null,
      null,
      null,
      null,
    ]);
  });

  // "A warning when a start/stop event comes within 10 % of it" (issue 15): with a 30° limit the
  // warning starts at 27° peak-to-peak (margin 3° = 10 % of 30°), worked out by hand.
  it("gives the end-stop margin to the travel limit and warns within 10 % of it", () => {
    expect(endStopMargin(20, 30)).toEqual({ marginDeg: 10, warn: false });
    expect(endStopMargin(26.5, 30)).toEqual({ marginDeg: 3.5, warn: false });
    expect(endStopMargin(27, 30)).toEqual({ marginDeg: 3, warn: true });
    expect(endStopMargin(32, 30)).toEqual({ marginDeg: -2, warn: true });
  });

  it("names events by kind, numbered only when a kind repeats", () => {
    expect(eventNames([{ kind: "start" }, { kind: "stop" }])).toEqual(["Start", "Stop"]);
    expect(eventNames([{ kind: "start" }, { kind: "stop" }, { kind: "start" }])).toEqual([
      "Start 1",
      "Stop",
      "Start 2",
    ]);
  });
});
