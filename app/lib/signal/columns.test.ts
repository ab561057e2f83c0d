import { describe, expect, it } from "vitest";
import { recogniseColumn, resolveColumns, type ColumnIssue } from "./columns.ts";

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
