import { describe, expect, it } from "vitest";
import { evaluateTargets, tally, type Target, type TargetEvidence } from "./targets";
import { marginText, scopeText } from "./target-text";

// Every expected value below is worked out by hand from the rule it checks. The rules are our
// own product rules (product rule, see docs/targets.md), except where a line names another source.

const iso: Target = {
  id: 1,
  name: "Run-up isolation",
  kind: "isolation",
  rpmFrom: 1000,
  rpmTo: 2000,
  minDb: 10,
  maxRadS2: null,
  maxDb: null,
  minMarginDeg: null,
  conditions: [],
  gears: [],
};
const rattle: Target = {
  id: 2,
  name: "Idle rattle",
  kind: "rattle",
  rpmFrom: null,
  rpmTo: null,
  minDb: null,
  maxRadS2: 400,
  maxDb: null,
  minMarginDeg: null,
  conditions: [],
  gears: [],
};
const runUp = { condition: "run-up" as const, gear: 3 };

/** Bins every `step` rpm from `from` to `to` (inclusive), dB from `db(rpm)`, all above noise. */
function bins(from: number, to: number, db: (rpm: number) => number, step = 50) {
  const out: { rpm: number; dB: number; aboveNoise: boolean }[] = [];
  for (let rpm = from; rpm <= to; rpm += step) out.push({ rpm, dB: db(rpm), aboveNoise: true });
  return out;
}
function evidence(points: TargetEvidence["isolation"], idle: TargetEvidence["idle"] = null) {
  return { isolation: points, binRpm: 50, idle, events: null, damperTravelLimitDeg: null };
}
const one = (
  t: Target,
  e: TargetEvidence,
  log: { condition: Target["conditions"][number]; gear: number | null } = runUp,
) => evaluateTargets([t], log, e)[0]!;

describe("isolation targets (product rule, see docs/targets.md)", () => {
  it("both range ends are included; bins outside the range do not count", () => {
    // 10 dB at 1000 rpm rising 1 dB per 100 rpm; 2 dB at 950 rpm and 3 dB at 2050 rpm lie outside.
    const points = [
      { rpm: 950, dB: 2, aboveNoise: true },
      ...bins(1000, 2000, (r) => 10 + (r - 1000) / 100),
      { rpm: 2050, dB: 3, aboveNoise: true },
    ];
    const v = one(iso, evidence(points));
    // Least in [1000, 2000] is the end bin itself: 10 dB at 1000 rpm, margin 10 − 10 = 0 → pass.
    expect(v).toMatchObject({
      status: "pass",
      value: 10,
      margin: 0,
      atRpm: 1000,
      unit: "dB",
      limit: 10,
    });
    expect(v.detail).not.toContain("covers only");
  });

  it("a bin exactly at the upper end fails the target when it is under the limit", () => {
    const points = bins(1000, 2000, (r) => (r === 2000 ? 9 : 14));
    // 9 − 10 = −1 dB.
    expect(one(iso, evidence(points))).toMatchObject({
      status: "fail",
      value: 9,
      margin: -1,
      atRpm: 2000,
    });
  });

  it("the margin is value − minDb: positive above the target, negative under it", () => {
    const above = one(iso, evidence(bins(1000, 2000, (r) => (r === 1500 ? 12.25 : 20))));
    // 12.25 − 10 = +2.25 dB.
    expect(above).toMatchObject({ status: "pass", value: 12.25, margin: 2.25, atRpm: 1500 });
    expect(marginText(above)).toBe("+2.3 dB");
    const under = one(
      iso,
      evidence(bins(1000, 2000, (r) => (r === 1500 ? 8.5 : r === 1800 ? 9.2 : 20))),
    );
    // Least measured bin 8.5 dB at 1500 rpm: 8.5 − 10 = −1.5 dB; two bins under the target.
    expect(under).toMatchObject({ status: "fail", value: 8.5, margin: -1.5, atRpm: 1500 });
    expect(under.detail).toContain("Under the target in 2 of 21 bins");
    expect(marginText(under)).toBe("−1.5 dB");
  });

  it("a lower bound (gearbox in its noise) that meets the target passes, and is named when it is the least", () => {
    const points = bins(1000, 2000, () => 14).map((p) =>
      p.rpm === 1500 ? { ...p, dB: 10.5, aboveNoise: false } : p,
    );
    const v = one(iso, evidence(points));
    // Least over the bins is the bound, 10.5 dB: margin +0.5 dB, at least that.
    expect(v).toMatchObject({ status: "pass", value: 10.5, margin: 0.5, atRpm: 1500 });
    expect(v.detail).toContain("lower bound");
  });

  it("a lower bound under the target neither fails nor passes it: not covered, and the detail says why", () => {
    const points = bins(1000, 2000, () => 14).map((p) =>
      p.rpm === 1500 ? { ...p, dB: 7, aboveNoise: false } : p,
    );
    const v = one(iso, evidence(points));
    expect(v).toMatchObject({ status: "not-covered", value: null, margin: null });
    expect(v.detail).toContain("at 1500 rpm");
    expect(v.detail).toContain("at least 7.0 dB");
    expect(v.detail).toContain("cannot fail it");
  });

  it("a measured bin under the target fails it even when a lower bound elsewhere is lower still", () => {
    const points = bins(1000, 2000, (r) => (r === 1200 ? 9 : 14)).map((p) =>
      p.rpm === 1500 ? { ...p, dB: 6, aboveNoise: false } : p,
    );
    // The fail is proven by the measured 9 dB bin: 9 − 10 = −1 dB.
    expect(one(iso, evidence(points))).toMatchObject({
      status: "fail",
      value: 9,
      margin: -1,
      atRpm: 1200,
    });
  });

  it("no bins in the range → not covered, naming what the log covers", () => {
    const v = one(iso, evidence(bins(500, 900, () => 3)));
    expect(v).toMatchObject({ status: "not-covered", value: null, margin: null, atRpm: null });
    expect(v.detail).toContain("this drive log covers 500–900 rpm");
    expect(one(iso, evidence([])).detail).toBe("This drive log has no isolation bins.");
  });

  it("ends more than one bin inside the range: covers only X–Y; passes at ≥ half, not covered below", () => {
    // Bins 1000…1600 rpm: 1000 counts 25 rpm (half its bin lies below the range), 12 more bins
    // 50 rpm each → 625 of 1000 rpm = 62.5 % ≥ 50 % → evaluated; 2000 − 1600 = 400 > 50 → partial.
    const most = one(iso, evidence(bins(1000, 1600, () => 12)));
    expect(most).toMatchObject({ status: "pass", value: 12, margin: 2 });
    expect(most.detail).toContain("covers only 1000–1600 rpm of 1000–2000 rpm");
    // Bins 1000…1400 rpm: 25 + 8 × 50 = 425 rpm = 42.5 % < 50 % → not covered.
    const few = one(iso, evidence(bins(1000, 1400, () => 12)));
    expect(few).toMatchObject({ status: "not-covered", value: null, margin: null });
    expect(few.detail).toContain("only 43 %");
    // A measured bin under the target fails it however little of the range is covered.
    expect(one(iso, evidence(bins(1000, 1400, (r) => (r === 1100 ? 9 : 12))))).toMatchObject({
      status: "fail",
      margin: -1,
      atRpm: 1100,
    });
  });

  it("an end exactly one bin inside the range is still full coverage; further inside is partial", () => {
    // First bin 1050 − 1000 = 50 = one bin width: not "further than one bin".
    expect(one(iso, evidence(bins(1050, 1950, () => 12))).detail).not.toContain("covers only");
    // First bin 1100 − 1000 = 100 > 50: partial.
    expect(one(iso, evidence(bins(1100, 2000, () => 12))).detail).toContain(
      "covers only 1100–2000 rpm",
    );
  });
});

describe("rattle targets (product rule, see docs/targets.md; the larger figure, as the rattle verdict in app/lib/signal/rattle.ts)", () => {
  it("value is the larger of the firing-order amplitude and the time-domain peak; margin = limit − value", () => {
    // 175.5 rad/s² is α = Δω·q·Ω for 10 rpm of order 2 at 800 rpm (docs/references.md [computed]).
    const peakLarger = one(
      rattle,
      evidence([], { gearboxAngAccelRadS2: 175.5, gearboxAngAccelPeakRadS2: 180.2, meanRpm: 800 }),
    );
    // 400 − 180.2 = 219.8 rad/s².
    expect(peakLarger).toMatchObject({
      status: "pass",
      value: 180.2,
      margin: 219.8,
      atRpm: 800,
      unit: "rad/s²",
    });
    const ampLarger = one(
      rattle,
      evidence([], { gearboxAngAccelRadS2: 450, gearboxAngAccelPeakRadS2: 380 }),
    );
    // 400 − 450 = −50 rad/s².
    expect(ampLarger).toMatchObject({ status: "fail", value: 450, margin: -50, atRpm: null });
    expect(marginText(ampLarger)).toBe("−50 rad/s²");
  });

  it("exactly at the limit passes with margin 0; no idle segment is not covered", () => {
    expect(
      one(rattle, evidence([], { gearboxAngAccelRadS2: 400, gearboxAngAccelPeakRadS2: 399.9 })),
    ).toMatchObject({ status: "pass", value: 400, margin: 0 });
    expect(one(rattle, evidence([]))).toMatchObject({
      status: "not-covered",
      value: null,
      margin: null,
      detail: "No idle segment in this drive log, so no rattle check.",
    });
  });
});

describe("conditions and gears (product rule, see docs/targets.md)", () => {
  const limited: Target = { ...iso, conditions: ["run-up", "coast-down"], gears: [2, 3] };
  const points = bins(1000, 2000, () => 12);
  it("a log of another condition or gear, or without a gear, is not applicable", () => {
    expect(one(limited, evidence(points), { condition: "idle-neutral", gear: 3 })).toMatchObject({
      status: "not-applicable",
      value: null,
      margin: null,
    });
    expect(one(limited, evidence(points), { condition: "run-up", gear: 4 }).status).toBe(
      "not-applicable",
    );
    expect(one(limited, evidence(points), { condition: "run-up", gear: null }).detail).toContain(
      "no gear given",
    );
    expect(one(limited, evidence(points), { condition: "coast-down", gear: 2 }).status).toBe(
      "pass",
    );
  });
  it("empty lists mean every drive log", () => {
    expect(one(iso, evidence(points), { condition: "other", gear: null }).status).toBe("pass");
    expect(scopeText(iso)).toBe("Every drive log");
    expect(scopeText(limited)).toBe("Run-up, Coast-down; gears 2, 3");
  });
  it("verdicts come in the order of the targets, and tally counts them", () => {
    const vs = evaluateTargets(
      [iso, rattle, limited],
      { condition: "idle-neutral", gear: null },
      evidence(points),
    );
    expect(vs.map((v) => [v.targetId, v.status])).toEqual([
      [1, "pass"],
      [2, "not-covered"],
      [1, "not-applicable"],
    ]);
    expect(tally(vs)).toEqual({ passed: 1, failed: 0, notCovered: 1, notApplicable: 1 });
  });
});

// ---- Start/stop kinds (issue 15) ----------------------------------------------------------------

const startStop: Target = {
  id: 3,
  name: "Start/stop amplification",
  kind: "start-stop",
  rpmFrom: null,
  rpmTo: null,
  minDb: null,
  maxRadS2: null,
  maxDb: 8,
  minMarginDeg: null,
  conditions: [],
  gears: [],
};
const twistMargin: Target = {
  ...startStop,
  id: 4,
  name: "End stops",
  kind: "twist-margin",
  maxDb: null,
  minMarginDeg: 5,
};
const startStopLog = { condition: "start-stop" as const, gear: 0 };
const event = (
  kind: "start" | "stop",
  startS: number,
  peakAmplificationDb: number | null,
  twistPeakToPeakDeg: number,
  resonanceRpm: number | null = 445,
) => ({ kind, startS, peakAmplificationDb, twistPeakToPeakDeg, resonanceRpm });
function withEvents(
  events: TargetEvidence["events"],
  damperTravelLimitDeg: number | null = 60,
): TargetEvidence {
  return { isolation: [], binRpm: 50, idle: null, events, damperTravelLimitDeg };
}

describe("start-stop targets (product rule, see docs/targets.md)", () => {
  it("judges the largest peak amplification over the events: margin = maxDb − value", () => {
    // Largest of 6.5 and 9.25 dB is 9.25 dB, in the stop; 8 − 9.25 = −1.25 dB → fail.
    const v = one(
      startStop,
      withEvents([event("start", 0.4, 6.5, 20), event("stop", 30.2, 9.25, 31, 430)]),
      startStopLog,
    );
    expect(v).toMatchObject({
      status: "fail",
      value: 9.25,
      margin: -1.25,
      limit: 8,
      unit: "dB",
      atRpm: 430,
    });
    expect(v.detail).toBe(
      "Largest peak amplification 9.3 dB in the engine stop at 30.2 s (resonance at 430 rpm): 1.3 dB over the target.",
    );
    // Limit 9.25 dB: a margin of exactly 0 passes.
    expect(
      one({ ...startStop, maxDb: 9.25 }, withEvents([event("stop", 1, 9.25, 3)]), startStopLog),
    ).toMatchObject({
      status: "pass",
      margin: 0,
    });
    expect(marginText({ margin: -1.25, unit: "dB" })).toBe("−1.3 dB");
  });

  it("is not covered without events, with events the order could not resolve, or for results before events existed", () => {
    expect(one(startStop, withEvents([]), startStopLog)).toMatchObject({
      status: "not-covered",
      value: null,
      margin: null,
      detail: "No engine start or stop in this drive log.",
    });
    expect(one(startStop, withEvents([event("start", 0, null, 12)]), startStopLog)).toMatchObject({
      status: "not-covered",
      detail:
        "The firing order was not resolved in the drive log's 1 start/stop event, so there is no peak amplification to judge.",
    });
    const old = one(startStop, withEvents(null), startStopLog);
    expect(old.status).toBe("not-covered");
    expect(old.detail).toMatch(/re-analyse the drive log/);
    // One unresolved event beside a resolved one: judged on the resolved one, and said so.
    const mixed = one(
      startStop,
      withEvents([event("start", 0, null, 12), event("stop", 9, 5, 14)]),
      startStopLog,
    );
    expect(mixed).toMatchObject({ status: "pass", value: 5, margin: 3 });
    expect(mixed.detail).toMatch(/1 event of 2 could not be resolved\.$/);
  });
});

describe("twist-margin targets (product rule, see docs/targets.md)", () => {
  it("value = travel limit − largest peak-to-peak twist; margin = value − minMarginDeg", () => {
    // Travel 60°, largest twist 52.5° → value 7.5°, margin 7.5 − 5 = 2.5° → pass.
    const v = one(
      twistMargin,
      withEvents([event("start", 0.5, 6, 52.5), event("stop", 20, 7, 40)], 60),
      startStopLog,
    );
    expect(v).toMatchObject({
      status: "pass",
      value: 7.5,
      margin: 2.5,
      limit: 5,
      unit: "°",
      atRpm: 445,
    });
    expect(v.detail).toBe(
      "Largest twist 52.5° peak to peak in the engine start at 0.5 s, 7.5° short of the 60.0° travel limit: 2.5° more margin than the target.",
    );
    expect(marginText(v)).toBe("+2.5°");
    // Travel 55°, twist 52.5° → value 2.5°, margin 2.5 − 5 = −2.5° → fail.
    expect(
      one(twistMargin, withEvents([event("start", 0.5, 6, 52.5)], 55), startStopLog),
    ).toMatchObject({
      status: "fail",
      value: 2.5,
      margin: -2.5,
    });
    // Twist beyond the travel: 62° against 60° → value −2°, margin −7°; the detail says the stops were reached.
    const hit = one(twistMargin, withEvents([event("stop", 3, 6, 62)], 60), startStopLog);
    expect(hit).toMatchObject({ status: "fail", value: -2, margin: -7 });
    expect(hit.detail).toMatch(
      /2\.0° beyond the 60\.0° travel limit \(the end stops were reached\)/,
    );
  });

  it("does not apply without a travel limit, and is not covered without events", () => {
    const v = one(twistMargin, withEvents([event("start", 0, 6, 30)], null), startStopLog);
    expect(v).toMatchObject({ status: "not-applicable", value: null, margin: null });
    expect(v.detail).toMatch(/no damper travel limit/);
    expect(one(twistMargin, withEvents([], 60), startStopLog).status).toBe("not-covered");
    expect(one(twistMargin, withEvents(null, 60), startStopLog).detail).toMatch(/re-analyse/);
  });

  it("takes conditions and gears like every kind", () => {
    const limited = { ...twistMargin, conditions: ["start-stop" as const] };
    expect(one(limited, withEvents([event("start", 0, 6, 30)]), runUp).status).toBe(
      "not-applicable",
    );
  });
});
