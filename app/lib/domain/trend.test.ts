import { describe, expect, it } from "vitest";
import {
  DEFAULT_TREND_THRESHOLDS,
  isolationNear,
  trendDateText,
  vehicleTrend,
  type TrendLogInput,
} from "./trend";

// The trend's rules are Twistlog's product rule (docs/trend.md); every expected number below is
// computed by hand from the inputs.

let nextId = 1;
function log(
  date: string,
  figures: Partial<
    Pick<
      TrendLogInput,
      | "naturalFrequencyHz"
      | "dampingRatio"
      | "isolationAtReferenceDb"
      | "startStopPeakAmplificationDb"
      | "damperVariant"
      | "signedOff"
      | "dateIsUpload"
    >
  >,
): TrendLogInput {
  const id = nextId++;
  return {
    logId: id,
    analysisId: 100 + id,
    analysisVersion: 1,
    fileName: `log-${id}.csv`,
    date,
    dateIsUpload: false,
    damperVariant: "A",
    naturalFrequencyHz: null,
    dampingRatio: null,
    isolationAtReferenceDb: null,
    startStopPeakAmplificationDb: null,
    ...figures,
  };
}

describe("vehicleTrend (docs/trend.md)", () => {
  it("orders points by date, takes the first as baseline and flags a natural frequency 12 % up", () => {
    const a = log("2026-11-04", { naturalFrequencyHz: 10, dampingRatio: 0.2 });
    const b = log("2026-11-20", { naturalFrequencyHz: 10.5, dampingRatio: 0.21 });
    const c = log("2026-12-01", { naturalFrequencyHz: 11.2, dampingRatio: 0.2 });
    const t = vehicleTrend({ vehicleId: 7, referenceRpm: 1500, logs: [c, a, b] });
    expect(t.vehicleId).toBe(7);
    expect(t.thresholds).toEqual(DEFAULT_TREND_THRESHOLDS);
    expect(t.variants).toHaveLength(1);
    const v = t.variants[0]!;
    expect(v.points.map((p) => p.logId)).toEqual([a.logId, b.logId, c.logId]);
    expect(v.baseline).toEqual({ logId: a.logId, date: "2026-11-04", kind: "first-analysed" });
    // (10.5 − 10)/10 = 5 % is inside ±10 %; (11.2 − 10)/10 = 12 % is beyond it.
    // Damping: (0.21 − 0.2)/0.2 = 5 %, inside ±25 %.
    expect(v.flags).toHaveLength(1);
    const f = v.flags[0]!;
    expect(f.quantity).toBe("naturalFrequencyHz");
    expect(f.logId).toBe(c.logId);
    expect(f.change).toBeCloseTo(12, 9);
    expect(f.unit).toBe("%");
    expect(f.baselineDate).toBe("2026-11-04");
    expect(f.message).toBe("natural frequency up 12 % since 4 Nov 2026");
  });

  it("flags dB quantities by difference and damping by relative change, not at the threshold itself", () => {
    const a = log("2026-01-10", {
      dampingRatio: 0.2,
      isolationAtReferenceDb: 12,
      startStopPeakAmplificationDb: 6,
    });
    const b = log("2026-02-10", {
      dampingRatio: 0.15, // −25 % exactly: not beyond the threshold
      isolationAtReferenceDb: 9, // −3 dB exactly: not flagged
      startStopPeakAmplificationDb: 9.5, // +3.5 dB: flagged
    });
    const c = log("2026-03-10", {
      dampingRatio: 0.14, // −30 %: flagged
      isolationAtReferenceDb: 8.6, // −3.4 dB: flagged
      startStopPeakAmplificationDb: 6,
    });
    const v = vehicleTrend({ vehicleId: 1, referenceRpm: 1500, logs: [a, b, c] }).variants[0]!;
    expect(v.flags.map((f) => [f.logId, f.quantity, f.message])).toEqual([
      [
        b.logId,
        "startStopPeakAmplificationDb",
        "start/stop peak amplification up 3.5 dB since 10 Jan 2026",
      ],
      [c.logId, "dampingRatio", "damping ratio down 30 % since 10 Jan 2026"],
      [c.logId, "isolationAtReferenceDb", "isolation at 1500 rpm down 3.4 dB since 10 Jan 2026"],
    ]);
    expect(v.flags[0]!.change).toBeCloseTo(3.5, 9);
    expect(v.flags[1]!.change).toBeCloseTo(-30, 9);
    expect(v.flags[2]!.change).toBeCloseTo(-3.4, 9);
  });

  it("compares a figure the baseline lacks with the first later point that has it", () => {
    const idle = log("2026-11-03", { startStopPeakAmplificationDb: 4 });
    const run1 = log("2026-11-04", { naturalFrequencyHz: 10 });
    const run2 = log("2026-11-18", { naturalFrequencyHz: 8.5 }); // −15 %
    const v = vehicleTrend({ vehicleId: 1, referenceRpm: 1500, logs: [run2, idle, run1] })
      .variants[0]!;
    expect(v.baseline?.logId).toBe(idle.logId);
    expect(v.flags).toHaveLength(1);
    expect(v.flags[0]!.baselineDate).toBe("2026-11-04");
    expect(v.flags[0]!.message).toBe("natural frequency down 15 % since 4 Nov 2026");
  });

  it("keeps variants apart, leaves out logs without figures, and prefers a signed-off baseline", () => {
    const a1 = log("2026-11-01", { naturalFrequencyHz: 10 });
    const a2 = log("2026-11-02", { naturalFrequencyHz: 12, signedOff: true });
    const a3 = log("2026-11-03", { naturalFrequencyHz: 12.6 }); // +5 % against a2: no flag
    const b1 = log("2026-11-01", { naturalFrequencyHz: 8, damperVariant: "B" });
    const empty = log("2026-11-05", { damperVariant: "B" });
    const t = vehicleTrend({ vehicleId: 1, referenceRpm: 2000, logs: [b1, a3, empty, a1, a2] });
    expect(t.variants.map((v) => v.damperVariant)).toEqual(["A", "B"]);
    const [va, vb] = t.variants;
    expect(va!.baseline).toEqual({ logId: a2.logId, date: "2026-11-02", kind: "signed-off" });
    expect(va!.points).toHaveLength(3);
    expect(va!.flags).toEqual([]);
    expect(vb!.points.map((p) => p.logId)).toEqual([b1.logId]);
    expect(vb!.flags).toEqual([]);
    // The points carry the public fields only.
    expect(Object.keys(va!.points[0]!).sort()).toEqual(
      [
        "analysisId",
        "analysisVersion",
        "date",
        "dateIsUpload",
        "dampingRatio",
        "fileName",
        "isolationAtReferenceDb",
        "logId",
        "naturalFrequencyHz",
        "startStopPeakAmplificationDb",
      ].sort(),
    );
  });

  it("orders logs of one date by id and answers no variants without logs", () => {
    const late = log("2026-05-01", { naturalFrequencyHz: 9 });
    const early = log("2026-05-01", { naturalFrequencyHz: 10 });
    const v = vehicleTrend({ vehicleId: 1, referenceRpm: 1500, logs: [early, late] }).variants[0]!;
    expect(v.points.map((p) => p.logId)).toEqual([late.logId, early.logId]);
    // (10 − 9)/9 = 11.1 % → flagged, rounded to a whole percent in words.
    expect(v.flags[0]!.message).toBe("natural frequency up 11 % since 1 May 2026");
    expect(v.flags[0]!.change).toBeCloseTo(11.11, 2);
    expect(vehicleTrend({ vehicleId: 1, referenceRpm: 1500, logs: [] }).variants).toEqual([]);
  });

  it("writes dates as day, month and year", () => {
    expect(trendDateText("2026-11-04")).toBe("4 Nov 2026");
    expect(trendDateText("2027-01-31")).toBe("31 Jan 2027");
  });
});

describe("isolationNear (docs/trend.md: the nearest measured bin within one bin width)", () => {
  const bins = [
    { rpm: 1450, dB: 10, aboveNoise: true },
    { rpm: 1500, dB: 11, aboveNoise: false },
    { rpm: 1550, dB: 12, aboveNoise: true },
  ];
  it("skips a bin within the noise floor and takes the nearest measured one", () => {
    // 1500 is a lower bound; 1450 and 1550 are both 50 rpm away: the lower one, 10 dB.
    expect(isolationNear(bins, 1500, 50)).toBe(10);
    expect(isolationNear(bins, 1540, 50)).toBe(12);
  });
  it("answers null when no measured bin lies within one bin width", () => {
    expect(isolationNear(bins, 1620, 50)).toBe(null); // 1550 is 70 rpm away
    expect(isolationNear(bins, 1600, 50)).toBe(12); // exactly one bin width: still counted
    expect(isolationNear([], 1500, 50)).toBe(null);
  });
});
