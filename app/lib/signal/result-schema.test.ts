import { describe, expect, it } from "vitest";
import { analysisResultSchema } from "./result-schema.ts";

const minimal = {
  firingOrder: 2,
  sampleRateHz: 2000,
  durationS: 52,
  settings: {
    cylinders: 4,
    stroke: 4,
    firingOrder: 2,
    samplesPerRev: 64,
    samplesPerRevMin: 32,
    samplesPerRevFixed: false,
    revsPerBlock: 8,
    overlap: 0.5,
    binRpm: 50,
    rattleLimitRadS2: 500,
    orderResolution: 0.125,
    topOrder: 8,
    lowPassHz: null,
    minValidRpm: 20,
    window: "hann-periodic",
  },
  blocks: 1,
  isolation: [{ rpm: 1000, dB: 12.4, blocks: 3, aboveNoise: true }],
  orderCurves: [{ order: 2, points: [{ rpm: 1000, crankRpm: 32.1, gearboxRpm: 7.7, blocks: 3 }] }],
  orderMap: {
    orderStep: 0.125,
    orderCount: 1,
    blocksPerRow: 1,
    blockRpm: [1000],
    timeS: [1],
    crankRpm: [[1]],
    gearboxRpm: [[1]],
  },
  segments: [{ kind: "idle", startS: 0, endS: 10, meanRpm: 820 }],
  idle: null,
  resonance: null,
  model: null,
  timeSpectrum: null,
  warnings: [],
};

describe("result schema (the public JSON contract)", () => {
  it("accepts the documented shape", () => {
    expect(analysisResultSchema.safeParse(minimal).success).toBe(true);
  });
  it("accepts a result stored before settings.detrend existed, and refuses values other than mean / linear", () => {
    expect(analysisResultSchema.parse(minimal).settings.detrend).toBeUndefined();
    const r = structuredClone(minimal) as { settings: Record<string, unknown> };
    r.settings.detrend = "linear";
    expect(analysisResultSchema.parse(r).settings.detrend).toBe("linear");
    r.settings.detrend = "quadratic";
    expect(analysisResultSchema.safeParse(r).success).toBe(false);
  });
  it("refuses NaN and Infinity anywhere a number goes (zod 4 z.number() is finite)", () => {
    for (const bad of [NaN, Infinity, -Infinity]) {
      const r = structuredClone(minimal);
      r.isolation[0]!.dB = bad;
      expect(analysisResultSchema.safeParse(r).success).toBe(false);
    }
  });
  it("checks the long series (order map, traces) value by value like z.array(z.number())", () => {
    // [path, value that must be refused]: non-finite, negative where non-negative, null where no
    // gap may be, a string, and not an array at all.
    const bad: [(r: Record<string, any>) => void, string][] = [
      [(r) => (r.orderMap.timeS = [1, NaN]), "NaN in a series"],
      [(r) => (r.orderMap.blockRpm = [Infinity]), "Infinity in a series"],
      [(r) => (r.orderMap.crankRpm = [[1, -0.5]]), "a negative amplitude"],
      [(r) => (r.orderMap.gearboxRpm = [[null]]), "null where no gap may be"],
      [(r) => (r.orderMap.timeS = ["1"]), "a string"],
      [(r) => (r.orderMap.timeS = { 0: 1 }), "an object"],
    ];
    for (const [spoil, what] of bad) {
      const r = structuredClone(minimal) as Record<string, any>;
      spoil(r);
      expect(analysisResultSchema.safeParse(r).success, what).toBe(false);
    }
    // Gaps (null) are allowed in the speed trace, and any finite speed, even negative.
    const ok = structuredClone(minimal) as Record<string, any>;
    ok.speedTrace = {
      timeS: [0, 1, 2],
      crankRpm: [800, null, -3],
      gearboxRpm: [790, null, 0],
      samplesPerPoint: 1,
    };
    expect(analysisResultSchema.safeParse(ok).success).toBe(true);
    ok.speedTrace.crankRpm = [800, "x", 1];
    expect(analysisResultSchema.safeParse(ok).success).toBe(false);
  });
  it("refuses an unknown segment kind and a rattle verdict outside ok / over-limit", () => {
    const r = structuredClone(minimal) as Record<string, unknown>;
    r.segments = [{ kind: "cruise", startS: 0, endS: 1, meanRpm: 900 }];
    expect(analysisResultSchema.safeParse(r).success).toBe(false);
    const s = structuredClone(minimal) as Record<string, unknown>;
    s.idle = {
      meanRpm: 820,
      gearboxAngAccelRadS2: 274,
      gearboxAngAccelPeakRadS2: 390,
      limitRadS2: 500,
      verdict: "fine",
      idleDurationS: 10,
      blocks: 4,
      spans: [],
    };
    expect(analysisResultSchema.safeParse(s).success).toBe(false);
  });
});
