import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cliTempDir, runCli } from "../../../tests/support/cli-process.ts";
import { differences } from "../../../tests/support/result-differences.ts";
import { analysisResultSchema } from "./result-schema.ts";

// The CLI as a user runs it: a separate node process with the tsx loader, on temp files.
const dir = cliTempDir("twistlog-cli-");
const run = runCli;

/** An analytic log: 1500 rpm with an order-2 fluctuation (10 rpm crank, 3 rpm gearbox), 2 kHz, 8 s. */
function goodLog(): string {
  const lines = ["time [s],crank speed [rpm],gearbox input speed [rpm]"];
  const w = (1500 * 2 * Math.PI) / 60;
  for (let i = 0; i < 16000; i++) {
    const t = i / 2000;
    lines.push(
      `${t.toFixed(4)},${(1500 + 10 * Math.sin(2 * w * t)).toFixed(4)},${(1500 + 3 * Math.sin(2 * w * t - 0.4)).toFixed(4)}`,
    );
  }
  return `${lines.join("\n")}\n`;
}
const good = join(dir, "good.csv");
writeFileSync(good, goodLog());

/** A stack trace line as node prints it ("    at fn (file:line:col)"). */
const STACK = /^\s+at\s/m;

describe("analyse CLI", () => {
  it("--json prints one document that passes analysisResultSchema, exit 0", () => {
    const r = run(good, "--json");
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const doc = JSON.parse(r.stdout) as unknown;
    const parsed = analysisResultSchema.safeParse(doc);
    expect(parsed.success).toBe(true);
    // Four-stroke, four cylinders: firing order z/2 = 2 (common practice; docs/references.md, Engines).
    expect(parsed.success && parsed.data.firingOrder).toBe(2);
    expect(parsed.success && parsed.data.sampleRateHz).toBeCloseTo(2000, 3);
  });
  it("the summary names the firing order and puts units on figures", () => {
    const r = run(good, "--cylinders", "4");
    expect(r.code).toBe(0);
    expect(r.stdout).toContain("firing order: 2");
    expect(r.stdout).toMatch(/1500 rpm\s+-?\d+\.\d dB/);
  });
  it("--low-memory analyses in windows with the same figures (within 0.01 dB, issue 17)", () => {
    const whole = run(good, "--json");
    const windows = run(good, "--json", "--low-memory");
    expect(windows.code).toBe(0);
    expect(windows.stderr).toBe("");
    expect(differences(JSON.parse(whole.stdout), JSON.parse(windows.stdout))).toEqual([]);
    // The analytic log's isolation: 20·log10(10 / 3) = 10.46 dB at 1500 rpm (the amplitudes it
    // was written with), whichever way it went.
    const doc = JSON.parse(windows.stdout) as { isolation: { rpm: number; dB: number }[] };
    expect(doc.isolation.find((p) => p.rpm === 1500)?.dB).toBeCloseTo(20 * Math.log10(10 / 3), 1);
  });
  it("a bad file: one stderr line with row and column, non-zero exit, no stack trace", () => {
    const bad = join(dir, "bad.csv");
    // Data line 11 (file row 12, t = 0.0050 s) gets text in the crank column.
    writeFileSync(bad, goodLog().replace(/\n0\.0050,[^,]*,/, "\n0.0050,abc,"));
    const r = run(bad, "--json");
    expect(r.code).not.toBe(0);
    expect(r.stdout).toBe("");
    expect(r.stderr.trimEnd().split("\n")).toHaveLength(1);
    expect(r.stderr).toContain("row 12");
    expect(r.stderr).toContain('"crank speed [rpm]"');
    expect(r.stderr).toContain("not_numeric");
    expect(r.stderr).not.toMatch(STACK);
  });
  it.each([
    ["a missing file", [join(dir, "nope.csv")], "file_not_found"],
    ["an unknown flag", [good, "--colour"], "Unknown option"],
    ["an unknown unit", [good, "--unit", "furlong/s"], "unknown unit"],
    ["a bad stroke", [good, "--stroke", "3"], "--stroke"],
    ["no file", [], "no drive log"],
    ["a folder", [dir], "folder"],
  ])("%s: one stderr line, non-zero exit, no stack trace", (_, args, text) => {
    const r = run(...args);
    expect(r.code).not.toBe(0);
    expect(r.stderr.trimEnd().split("\n")).toHaveLength(1);
    expect(r.stderr).toContain(text);
    expect(r.stderr).not.toMatch(STACK);
  });
});
