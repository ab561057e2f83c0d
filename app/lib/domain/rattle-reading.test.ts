import { describe, expect, it } from "vitest";
import { rattleReading } from "./rattle-reading";

const base = {
  meanRpm: 812.4,
  gearboxAngAccelRadS2: 310,
  gearboxAngAccelPeakRadS2: 420,
  limitRadS2: 500,
  verdict: "ok" as const,
  idleDurationS: 40,
  blocks: 90,
  spans: [],
  accelTrace: null,
};

describe("rattle reading", () => {
  it("puts the order amplitude and the peak against the limit in per cent (310/500 = 62 %, 420/500 = 84 %)", () => {
    const r = rattleReading(base);
    expect(r.verdict).toBe("ok");
    expect(r.sentences[0]).toContain("812 rpm");
    expect(r.sentences[0]).toContain("310 rad/s², 38 % below the 500 rad/s² limit");
    expect(r.sentences[1]).toContain("420 rad/s² (16 % below the limit)");
    expect(r.sentences).toHaveLength(2);
    expect(r.headline).toMatch(/unlikely/);
  });

  it("adds up the spans above the limit and their share of the idle time (1.5 + 2.5 s of 40 s = 10 %)", () => {
    const r = rattleReading({
      ...base,
      gearboxAngAccelRadS2: 640,
      gearboxAngAccelPeakRadS2: 900,
      verdict: "over-limit",
      spans: [
        { startS: 3, endS: 4.5, durationS: 1.5, peakRadS2: 700 },
        { startS: 10, endS: 12.5, durationS: 2.5, peakRadS2: 900 },
      ],
    });
    expect(r.overS).toBeCloseTo(4, 9);
    expect(r.overPercent).toBeCloseTo(10, 9);
    expect(r.sentences[0]).toContain("640 rad/s², 28 % above");
    expect(r.sentences[2]).toBe(
      "It stays above the limit in 2 spans, 4.0 s in all, 10 % of the 40.0 s of idle examined.",
    );
    expect(r.headline).toMatch(/likely/);
  });
});
