import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cliTempDir, runCli } from "../../../tests/support/cli-process.ts";

// `--list-channels` as a user runs it (cli.test.ts style): a node process with tsx, a temp file.
const dir = cliTempDir("twistlog-cli-channels-");
const run = runCli;

// 1000 rows at 2 kHz (t = i/2000 s); the crank ramps 1000 + i rpm (min 1000, max 1999 by
// construction), the gearbox holds 900 rpm, a temperature column is not a speed.
const lines = ["time [s],crank speed [rpm],gearbox input speed [rpm],oil temp [degC]"];
for (let i = 0; i < 1000; i++) lines.push(`${(i / 2000).toFixed(4)},${1000 + i},900,85`);
const csv = join(dir, "four.csv");
writeFileSync(csv, `${lines.join("\n")}\n`);

describe("analyse --list-channels", () => {
  it("prints one line per column with count, range and role, exit 0", () => {
    const r = run(csv, "--list-channels");
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const rows = r.stdout.trimEnd().split("\n");
    expect(rows).toHaveLength(5); // the table's header and four channels
    expect(rows[0]).toMatch(/^name\s+unit\s+group\s+rate Hz\s+samples\s+min\s+max\s+role$/);
    const crank = rows.find((l) => l.startsWith("crank speed"));
    expect(crank).toMatch(/\s1000\s+1000\s+1999\s+crank$/);
    expect(rows.find((l) => l.startsWith("time"))).toMatch(/\s2000\s+1000\s+0\s+0\.4995\s+time$/);
    expect(rows.find((l) => l.startsWith("gearbox"))).toMatch(/\s900\s+900\s+gearbox$/);
    expect(rows.find((l) => l.startsWith("oil temp"))).toMatch(/\s-$/);
  });

  it("an ASAM MDF4 file: every channel with its group, rate and sample count", () => {
    // Reference: tests/fixtures/mdf4/drive-log-plain.expected.json, written by an independent
    // reader — group "Engine" of 8000 samples with EngSpd in rpm, a time master every 0.5 ms
    // (2 kHz); group "Gearbox" of 4000 samples with GbxInpShaftSpd, every 1 ms (1 kHz).
    const r = run("tests/fixtures/mdf4/drive-log-plain.mf4", "--list-channels"); // the CLI runs in the repository root;
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const rows = r.stdout.trimEnd().split("\n");
    expect(rows.find((l) => l.startsWith("EngSpd "))).toMatch(
      /^EngSpd\s+rpm\s+Engine\s+2000\s+8000\s/,
    );
    expect(rows.find((l) => l.startsWith("GbxInpShaftSpd "))).toMatch(
      /^GbxInpShaftSpd\s+rpm\s+Gearbox\s+1000\s+4000\s/,
    );
  });

  it("a missing file: one stderr line, exit 1, nothing on stdout", () => {
    const r = run(join(dir, "nope.csv"), "--list-channels");
    expect(r.code).toBe(1);
    expect(r.stdout).toBe("");
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toContain("file_not_found");
  });

  it("--help names --list-channels", () => {
    expect(run("--help").stdout).toContain("--list-channels");
  });
});
