import { describe, expect, it } from "vitest";
import type { TrendPoint, VariantTrend } from "~/lib/domain/trend";
import { analysedPoints, dateSeconds, trendSeries } from "./trend-series";

// A variant whose natural frequency rises by 15 % (12 Hz → 13.8 Hz) over three test dates; the
// expected band and flags are worked out by hand from the thresholds.
function point(logId: number, date: string, naturalFrequencyHz: number | null): TrendPoint {
  return {
    logId,
    analysisId: logId * 10,
    analysisVersion: 1,
    fileName: `kestrel-${logId}.csv`,
    date,
    dateIsUpload: false,
    naturalFrequencyHz,
    dampingRatio: 0.12,
    isolationAtReferenceDb: 20,
    startStopPeakAmplificationDb: null,
  };
}

const variant: VariantTrend = {
  damperVariant: "A",
  baseline: { logId: 1, date: "2026-11-04", kind: "first-analysed" },
  points: [point(1, "2026-11-04", 12), point(2, "2026-11-18", 12.6), point(3, "2026-12-02", 13.8)],
  flags: [
    {
      quantity: "naturalFrequencyHz",
      logId: 3,
      change: 15,
      unit: "%",
      baselineDate: "2026-11-04",
      message: "natural frequency up 15 % since 4 Nov 2026",
    },
  ],
};
const thresholds = {
  naturalFrequencyPct: 10,
  dampingRatioPct: 20,
  isolationDb: 3,
  amplificationDb: 3,
};

describe("damper-health trend series", () => {
  it("places test dates at UTC midnight (2026-11-04 is day 20761 since 1970-01-01)", () => {
    // 56 years from 1970 with 14 leap days = 20454 days to 2026-01-01; Nov 4 is day 307 of 2026 (0-based).
    expect(dateSeconds("2026-11-04")).toBe((20454 + 307) * 86400);
  });

  it("gives the baseline, a ±10 % band around it for the natural frequency, and the flagged log", () => {
    const s = trendSeries(variant, "naturalFrequencyHz", thresholds);
    expect(s.y).toEqual([12, 12.6, 13.8]);
    expect(s.baseline).toBe(12);
    expect(s.band![0]).toBeCloseTo(10.8, 10);
    expect(s.band![1]).toBeCloseTo(13.2, 10);
    expect(s.flagged).toEqual([false, false, true]);
  });

  it("uses a difference in dB for the isolation, and no band without a baseline value", () => {
    const iso = trendSeries(variant, "isolationAtReferenceDb", thresholds);
    expect(iso.band).toEqual([17, 23]);
    expect(iso.flagged).toEqual([false, false, false]);
    const amp = trendSeries(variant, "startStopPeakAmplificationDb", thresholds);
    expect([amp.baseline, amp.band]).toEqual([null, null]);
    expect(
      analysedPoints({ vehicleId: 1, referenceRpm: 1500, thresholds, variants: [variant] }),
    ).toBe(3);
    expect(analysedPoints(null)).toBe(0);
  });
});
