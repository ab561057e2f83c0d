import { describe, expect, it } from "vitest";
import { parseCliArgs } from "./cli-args.ts";

// The flag list is issue 4, point 6; parsing is node:util parseArgs (strict mode).
describe("CLI arguments", () => {
  it("maps every flag to its option", () => {
    const r = parseCliArgs([
      "log.csv",
      "--cylinders",
      "6",
      "--stroke",
      "2",
      "--order",
      "3",
      "--time",
      "t",
      "--crank",
      "n1",
      "--gearbox",
      "n2",
      "--unit",
      "Hz",
      "--time-unit",
      "ms",
      "--rattle-limit",
      "450",
      "--bin-rpm",
      "100",
      "--json",
    ]);
    expect(r).toEqual({
      ok: true,
      value: {
        file: "log.csv",
        json: true,
        help: false,
        ingest: {
          timeColumn: "t",
          crankColumn: "n1",
          gearboxColumn: "n2",
          unit: "rev/s",
          timeUnit: "ms",
        },
        analysis: { cylinders: 6, stroke: 2, firingOrder: 3, rattleLimitRadS2: 450, binRpm: 100 },
      },
    });
  });
  it.each([
    [["log.csv", "--cylinders", "2.5"], "--cylinders"],
    [["log.csv", "--cylinders", "0"], "--cylinders"],
    [["log.csv", "--stroke", "3"], "--stroke"],
    [["log.csv", "--unit", "mph"], "unknown unit"],
    [["log.csv", "--time-unit", "min"], "unknown unit"],
    [["log.csv", "--rattle-limit", "-1"], "--rattle-limit"],
    [["log.csv", "--bin-rpm", "abc"], "--bin-rpm"],
    [["log.csv", "--frobnicate"], "Unknown option"],
    [["log.csv", "--cylinders"], "argument missing"],
    [[], "no drive log"],
    [["a.csv", "b.csv"], "one file at a time"],
  ])("%j is refused with a one-line message", (argv, text) => {
    const r = parseCliArgs(argv);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.message).toContain(text);
    expect(r.message).not.toContain("\n");
  });
});

// Issue 14 §2: the repair flags map to the ingest's FinishOptions (limit in ms → s).
describe("repair flags", () => {
  it("--strict, --repair-limit-ms and --repair-limit-samples", () => {
    const r = parseCliArgs([
      "log.csv",
      "--strict",
      "--repair-limit-ms",
      "5",
      "--repair-limit-samples",
      "8",
    ]);
    expect(r.ok && r.value.ingest).toEqual({
      strict: true,
      repairMaxS: 0.005,
      repairMaxSamples: 8,
    });
  });
  it("--header-row picks the header's file line", () => {
    const r = parseCliArgs(["log.csv", "--header-row", "7"]);
    expect(r.ok && r.value.ingest).toEqual({ headerRow: 7 });
  });
  it.each([
    [["log.csv", "--repair-limit-ms", "0"], "--repair-limit-ms"],
    [["log.csv", "--repair-limit-samples", "2.5"], "--repair-limit-samples"],
    [["log.csv", "--header-row", "0"], "--header-row"],
  ])("%j is refused with a one-line message", (argv, text) => {
    const r = parseCliArgs(argv);
    expect(r.ok ? "" : r.message).toContain(text);
  });
});
