import { describe, expect, it } from "vitest";
import {
  RAD_S_PER_UNIT,
  S_PER_UNIT,
  fromRadS,
  parseSpeedUnit,
  parseTimeUnit,
  radSToRpm,
  toRadS,
} from "./units.ts";

// Definitions: SI Brochure, 9th ed. (BIPM 2019), table 4 (non-SI units accepted for use with
// the SI: minute = 60 s, degree = (π/180) rad) and §2.3.4 (one revolution = 2π rad).
describe("speed conversion against the SI definitions", () => {
  it("1 rpm = 2π/60 rad/s (one revolution per minute)", () => {
    expect(toRadS(1, "rpm")).toBeCloseTo((2 * Math.PI) / 60, 15);
    // 3000 rpm = 50 rev/s = 100π rad/s, exact by the same definitions (tolerance 1e-12).
    expect(toRadS(3000, "rpm")).toBeCloseTo(100 * Math.PI, 12);
  });
  it("1 deg/s = π/180 rad/s", () => {
    expect(toRadS(1, "deg/s")).toBeCloseTo(Math.PI / 180, 15);
    expect(toRadS(360, "deg/s")).toBeCloseTo(2 * Math.PI, 13);
  });
  it("1 rev/s = 2π rad/s, and 1 rev/s = 60 rpm", () => {
    expect(toRadS(1, "rev/s")).toBeCloseTo(2 * Math.PI, 15);
    expect(radSToRpm(toRadS(1, "rev/s"))).toBeCloseTo(60, 12);
  });
  it("rad/s is the identity and every unit round-trips (relative 1e-15)", () => {
    expect(RAD_S_PER_UNIT["rad/s"]).toBe(1);
    for (const u of ["rpm", "rad/s", "deg/s", "rev/s"] as const) {
      expect(fromRadS(toRadS(1234.5678, u), u)).toBeCloseTo(1234.5678, 10);
    }
  });
  it("1 ms = 1e-3 s (SI prefix milli)", () => {
    expect(S_PER_UNIT.ms).toBe(1e-3);
    expect(S_PER_UNIT.s).toBe(1);
  });
});

describe("unit names as written in headers", () => {
  it.each([
    ["rpm", "rpm"],
    ["RPM", "rpm"],
    ["1/min", "rpm"],
    ["min^-1", "rpm"],
    ["min⁻¹", "rpm"],
    ["rad/s", "rad/s"],
    ["rad_s", "rad/s"],
    ["deg/s", "deg/s"],
    ["°/s", "deg/s"],
    ["Hz", "rev/s"],
    ["rev/s", "rev/s"],
    ["rps", "rev/s"],
  ])("%s → %s", (text, unit) => {
    expect(parseSpeedUnit(text)).toBe(unit);
  });
  it("refuses what is not a speed", () => {
    for (const t of ["Nm", "rad/s²", "°", "%", "s", "kg"])
      expect(parseSpeedUnit(t)).toBeUndefined();
  });
  it("reads time units", () => {
    expect(parseTimeUnit("s")).toBe("s");
    expect(parseTimeUnit("ms")).toBe("ms");
    expect(parseTimeUnit("sec")).toBe("s");
    expect(parseTimeUnit("rpm")).toBeUndefined();
  });
});
