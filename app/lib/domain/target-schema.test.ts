import { describe, expect, it } from "vitest";
import { targetSchema } from "./target-schema";

// Every expected value below is worked out by hand from the rule it checks. The rules are our
// own product rules (product rule, see docs/targets.md), except where a line names another source.

describe("targetSchema (the form and API input)", () => {
  const form = {
    kind: "isolation",
    name: " Run-up ",
    rpmFrom: "1000",
    rpmTo: "3000",
    minDb: "−2.5",
  };
  const errors = (input: unknown) => {
    const r = targetSchema.safeParse(input);
    return r.success
      ? {}
      : Object.fromEntries(r.error.issues.map((i) => [i.path.join("."), i.message]));
  };

  it("reads form strings: trimmed name, a typographic minus, no conditions or gears = every log", () => {
    expect(targetSchema.parse(form)).toEqual({
      kind: "isolation",
      name: "Run-up",
      rpmFrom: 1000,
      rpmTo: 3000,
      minDb: -2.5,
      conditions: [],
      gears: [],
    });
  });

  it("reads one checkbox (a string), several (an array) and gears typed as text", () => {
    expect(targetSchema.parse({ ...form, conditions: "run-up", gears: "3, 2 r" })).toMatchObject({
      conditions: ["run-up"],
      gears: [-1, 2, 3],
    });
    expect(
      targetSchema.parse({ ...form, conditions: ["coast-down", "run-up"], gears: [2, 2] }),
    ).toMatchObject({ conditions: ["run-up", "coast-down"], gears: [2] });
  });

  it("takes JSON numbers, and ignores the other kind's fields", () => {
    expect(
      targetSchema.parse({
        kind: "rattle",
        name: "Idle",
        maxRadS2: 350,
        rpmFrom: "oops",
        minDb: "",
      }),
    ).toEqual({ kind: "rattle", name: "Idle", maxRadS2: 350, conditions: [], gears: [] });
  });

  it("refuses with clear messages: order of the range, its limits, the dB and rad/s² bounds, missing fields", () => {
    expect(errors({ ...form, rpmFrom: "3000", rpmTo: "3000" })).toEqual({
      rpmTo: "The highest engine speed must be above the lowest (3000 rpm).",
    });
    expect(errors({ ...form, rpmFrom: "-10", rpmTo: "10001" })).toEqual({
      rpmFrom: "The lowest engine speed is at least 0 rpm.",
      rpmTo: "The highest engine speed is at most 10000 rpm.",
    });
    expect(errors({ ...form, minDb: "61" })).toEqual({
      minDb: "The minimum isolation is at most 60 dB.",
    });
    expect(errors({ ...form, minDb: "-40.5" })).toEqual({
      minDb: "The minimum isolation is at least -40 dB.",
    });
    expect(errors({ ...form, minDb: "ten" })).toEqual({
      minDb: "The minimum isolation is a number of dB, e.g. 10 or −2.5.",
    });
    expect(errors({ kind: "rattle", name: "x", maxRadS2: "0" })).toEqual({
      maxRadS2: "The maximum angular acceleration is more than 0 rad/s².",
    });
    expect(errors({ kind: "rattle", name: "x" })).toEqual({
      maxRadS2: "Enter the maximum angular acceleration in rad/s².",
    });
    expect(errors({ kind: "isolation", name: "" })).toEqual({
      name: "Give the target a name, e.g. “Run-up isolation 1000–3000 rpm”.",
      rpmFrom: "Enter the lowest engine speed in rpm.",
      rpmTo: "Enter the highest engine speed in rpm.",
      minDb: "Enter the minimum isolation in dB.",
    });
    expect(errors({ ...form, kind: "noise" })).toEqual({
      kind: "Choose what the target limits: isolation, rattle, start/stop amplification or twist margin.",
    });
    expect(errors({ ...form, conditions: ["uphill"] })).toEqual({
      "conditions.0": "Choose test conditions from the list.",
    });
    expect(errors({ ...form, gears: "2 x" })).toEqual({
      "gears.1": "Gears are whole numbers, e.g. 2 3 4 (R for reverse, N for neutral).",
    });
  });

  it("reports every problem of one submission together: field errors and the range order (issue 11)", () => {
    expect(
      errors({ kind: "isolation", name: "", rpmFrom: "3000", rpmTo: "1000", minDb: "abc" }),
    ).toEqual({
      name: "Give the target a name, e.g. “Run-up isolation 1000–3000 rpm”.",
      rpmTo: "The highest engine speed must be above the lowest (3000 rpm).",
      minDb: "The minimum isolation is a number of dB, e.g. 10 or −2.5.",
    });
    // A range end that is itself wrong is not compared; the other missing fields still show.
    expect(errors({ kind: "isolation", name: "x", rpmFrom: "abc", rpmTo: "1000" })).toEqual({
      rpmFrom: "The lowest engine speed is a number of rpm, e.g. 1000.",
      minDb: "Enter the minimum isolation in dB.",
    });
    expect(errors({ kind: "rattle", name: "", gears: "x" })).toEqual({
      name: "Give the target a name, e.g. “Run-up isolation 1000–3000 rpm”.",
      "gears.0": "Gears are whole numbers, e.g. 2 3 4 (R for reverse, N for neutral).",
      maxRadS2: "Enter the maximum angular acceleration in rad/s².",
    });
    expect(targetSchema.safeParse(null).success).toBe(false);
  });
});

describe("targetSchema: the start/stop kinds (issue 15; product rule, see docs/targets.md)", () => {
  const errors = (input: unknown) => {
    const r = targetSchema.safeParse(input);
    return r.success
      ? {}
      : Object.fromEntries(r.error.issues.map((i) => [i.path.join("."), i.message]));
  };

  it("reads a start-stop and a twist-margin target, ignoring the other kinds' fields", () => {
    expect(
      targetSchema.parse({
        kind: "start-stop",
        name: " Stop ",
        maxDb: "8.5",
        minDb: "x",
        maxRadS2: "",
      }),
    ).toEqual({ kind: "start-stop", name: "Stop", maxDb: 8.5, conditions: [], gears: [] });
    expect(
      targetSchema.parse({
        kind: "twist-margin",
        name: "End stops",
        minMarginDeg: 5,
        maxDb: "nonsense",
        conditions: "start-stop",
      }),
    ).toEqual({
      kind: "twist-margin",
      name: "End stops",
      minMarginDeg: 5,
      conditions: ["start-stop"],
      gears: [],
    });
    // A typographic minus is read as a minus: a start-stop limit may be below 0 dB.
    expect(targetSchema.parse({ kind: "start-stop", name: "S", maxDb: "−3" })).toMatchObject({
      maxDb: -3,
    });
  });

  it("refuses missing, unreadable and out-of-range limits with clear messages", () => {
    expect(errors({ kind: "start-stop", name: "S" })).toEqual({
      maxDb: "Enter the maximum peak amplification in dB.",
    });
    expect(errors({ kind: "start-stop", name: "S", maxDb: "loud" })).toEqual({
      maxDb: "The maximum peak amplification is a number of dB, e.g. 8.",
    });
    expect(errors({ kind: "start-stop", name: "S", maxDb: "61" })).toEqual({
      maxDb: "The maximum peak amplification is at most 60 dB.",
    });
    expect(errors({ kind: "start-stop", name: "S", maxDb: "-21" })).toEqual({
      maxDb: "The maximum peak amplification is at least -20 dB.",
    });
    expect(errors({ kind: "twist-margin", name: "T" })).toEqual({
      minMarginDeg: "Enter the minimum twist margin in degrees.",
    });
    expect(errors({ kind: "twist-margin", name: "T", minMarginDeg: "-1" })).toEqual({
      minMarginDeg: "The minimum twist margin is at least 0°.",
    });
    expect(errors({ kind: "twist-margin", name: "T", minMarginDeg: "181" })).toEqual({
      minMarginDeg: "The minimum twist margin is at most 180°.",
    });
  });
});
