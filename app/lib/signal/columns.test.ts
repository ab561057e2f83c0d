import { describe, expect, it } from "vitest";
import { fitRemembered, recogniseColumn, resolveColumns, type ColumnIssue } from "./columns.ts";

// The header forms are the examples in issue 4 and docs/architecture.md §4 (roles: crank / engine /
// primary / flywheel → crank side; gearbox / transmission / input shaft / secondary → gearbox).
describe("header recognition", () => {
  it.each([
    ["Crank speed [rpm]", "crank", "rpm"],
    ["engine_speed_rad_s", "crank", "rad/s"],
    ["input shaft speed (deg/s)", "gearbox", "deg/s"],
    ["primary flywheel speed [1/min]", "crank", "rpm"],
    ["secondary flywheel speed [rpm]", "gearbox", "rpm"],
    ["transmission input speed {rev/s}", "gearbox", "rev/s"],
    ["gearbox speed Hz", "gearbox", "rev/s"],
    ["crank_rev_s", "crank", "rev/s"],
    ["Gearbox Input Speed (rad/s)", "gearbox", "rad/s"],
  ] as const)("%s → %s in %s", (name, role, unit) => {
    expect(recogniseColumn(name)).toEqual({ role, speedUnit: unit });
  });
  it.each([
    ["t_ms", "ms"],
    ["time [s]", "s"],
    ["Time (ms)", "ms"],
    ["time_s", "s"],
  ] as const)("%s is time in %s", (name, unit) => {
    expect(recogniseColumn(name)).toEqual({ role: "time", timeUnit: unit });
  });
  it("a speed name without a unit keeps its role and no unit", () => {
    expect(recogniseColumn("engine speed")).toEqual({ role: "crank" });
    expect(recogniseColumn("time")).toEqual({ role: "time" });
  });
  it.each([
    "engine torque [Nm]",
    "crank angle [deg]",
    "gear",
    "pedal [%]",
    "oil temp [°C]",
    "input shaft accel [rad/s²]",
  ])("%s is not a speed channel", (name) => {
    expect(recogniseColumn(name).role).toBe("other");
  });
});

describe("column map", () => {
  const header = ["time [s]", "crank speed [rpm]", "gearbox input speed [rpm]", "gear"];
  it("maps roles and keeps the rest as extra", () => {
    const r = resolveColumns(header);
    expect(r.ok && r.map).toMatchObject({
      time: 0,
      crank: 1,
      gearbox: 2,
      timeUnit: "s",
      crankUnit: "rpm",
      gearboxUnit: "rpm",
      extra: [{ index: 3, name: "gear" }],
    });
  });
  it("two crank candidates → ambiguous_columns listing both and every column", () => {
    const r = resolveColumns([
      "time [s]",
      "crank speed [rpm]",
      "engine speed [rpm]",
      "gearbox [rpm]",
    ]);
    expect(r.ok).toBe(false);
    const e = (r as { error: ColumnIssue }).error;
    expect(e).toMatchObject({
      code: "ambiguous_columns",
      row: 1,
      role: "crank",
      candidates: ["crank speed [rpm]", "engine speed [rpm]"],
    });
    expect(e.columns).toHaveLength(4);
  });
  it("no gearbox candidate → missing_channel with the columns", () => {
    const r = resolveColumns(["time [s]", "crank speed [rpm]", "oil temp [°C]"]);
    expect(!r.ok && r.error).toMatchObject({
      code: "missing_channel",
      role: "gearbox",
      columns: ["time [s]", "crank speed [rpm]", "oil temp [°C]"],
    });
  });
  it("options override names and units, case- and space-insensitively", () => {
    const r = resolveColumns(["a", "b", "c"], {
      timeColumn: "A",
      crankColumn: " b ",
      gearboxColumn: "c",
      unit: "rad/s",
      timeUnit: "ms",
    });
    expect(r.ok && r.map).toMatchObject({
      time: 0,
      crank: 1,
      gearbox: 2,
      crankUnit: "rad/s",
      gearboxUnit: "rad/s",
      timeUnit: "ms",
    });
  });
  it("an override that names no column → unknown_column", () => {
    const r = resolveColumns(header, { crankColumn: "flywheel" });
    expect(!r.ok && r.error.code).toBe("unknown_column");
  });
  it("a missing unit is assumed (rpm, s) with a warning", () => {
    const r = resolveColumns(["time", "engine speed", "gearbox speed"]);
    expect(r.ok && r.map).toMatchObject({ crankUnit: "rpm", gearboxUnit: "rpm", timeUnit: "s" });
    expect(r.ok && r.warnings.map((w) => w.code)).toEqual([
      "unit_assumed",
      "unit_assumed",
      "unit_assumed",
    ]);
  });
});

// Issue 11 §3.1: a vehicle remembers the columns chosen by hand for one odd file; that choice is
// only a suggestion for the next files and applies when the columns it names are there.
describe("a remembered column choice", () => {
  const odd = ["Zeit", "Kanal1", "Kanal2", "Kanal3"];
  const standard = ["time [s]", "crank speed [rpm]", "gearbox input speed [rpm]"];
  const remembered = {
    timeColumn: "Zeit",
    crankColumn: "Kanal1",
    gearboxColumn: "Kanal2",
    crankUnit: "rpm",
    gearboxUnit: "rpm",
  } as const;

  it("applies to a file that has every column it names (names matched like overrides)", () => {
    expect(fitRemembered(odd, remembered)).toEqual(remembered);
    expect(fitRemembered([" zeit", "KANAL1", "kanal2"], remembered)).toEqual(remembered);
  });
  it("does not apply when one named column is missing: the header is recognised as usual", () => {
    expect(fitRemembered(standard, remembered)).toBeNull();
    expect(fitRemembered(["Zeit", "Kanal1", "Kanal9"], remembered)).toBeNull();
    const r = resolveColumns(standard, fitRemembered(standard, remembered) ?? {});
    expect(r.ok && r.map).toMatchObject({ time: 0, crank: 1, gearbox: 2, crankUnit: "rpm" });
  });
  it("a partial choice applies where its column exists; the header decides the rest", () => {
    const partial = { gearboxColumn: "shaft b [rpm]", gearboxUnit: "rpm" } as const;
    const header = ["time [s]", "engine speed [rpm]", "shaft b [rpm]"];
    expect(fitRemembered(header, partial)).toEqual(partial);
    expect(fitRemembered(standard, partial)).toBeNull();
  });
  it("a unit for a channel left to the header only fills in a unit the header does not give", () => {
    const units = { timeUnit: "ms", crankUnit: "rad/s" } as const;
    // "time [s]" and "crank speed [rpm]" say their units: the remembered ones must not override them.
    expect(fitRemembered(standard, units)).toBeNull();
    // Names without units: the remembered units fill in what would otherwise be assumed.
    expect(fitRemembered(["time", "engine speed", "gearbox speed [rpm]"], units)).toEqual(units);
  });
  it("a choice that names no column and no unit applies to nothing", () => {
    expect(fitRemembered(standard, {})).toBeNull();
  });
});
