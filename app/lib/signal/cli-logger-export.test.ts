import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { cliTempDir, runCli } from "../../../tests/support/cli-process.ts";

// The failing case as a user ran it (issue 14 §1): a logger export with "# Recorder: …",
// "Rate = 5 kHz", a blank line, `t;n_kw;n_ge;gear`, `[s];[1/min];[1/min];[-]` and `;` data with
// a decimal comma, through the CLI in its own node process. The data are analytic: 1500 rpm with
// an order-2 ripple of 10 rpm (crank) and 3 rpm (gearbox), 5 kHz, 6 s.
const dir = cliTempDir("twistlog-cli-export-");
const run = runCli;

const FS = 5000;
const w = (1500 * 2 * Math.PI) / 60;
const lines = ["# Recorder: Kestrel DL-8", "Rate = 5 kHz", "", "t;n_kw;n_ge;gear"];
lines.push("[s];[1/min];[1/min];[-]");
for (let i = 0; i < 6 * FS; i++) {
  const t = i / FS;
  const cells = [t.toFixed(4), (1500 + 10 * Math.sin(2 * w * t)).toFixed(4)];
  cells.push((1500 + 3 * Math.sin(2 * w * t - 0.4)).toFixed(4));
  lines.push([...cells.map((c) => c.replace(".", ",")), "3"].join(";"));
}
const file = join(dir, "kestrel-export.csv");
writeFileSync(file, `${lines.join("\n")}\n`);

describe("the logger export through the CLI", () => {
  it("is analysed with --time/--crank/--gearbox; the preamble is in source.metadata", () => {
    const r = run(file, "--time", "t", "--crank", "n_kw", "--gearbox", "n_ge", "--json");
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const result = JSON.parse(r.stdout) as {
      source: { metadata: unknown };
      warnings: { code: string }[];
    };
    expect(result.source.metadata).toEqual([
      { key: "Recorder", value: "Kestrel DL-8" },
      { key: "Rate", value: "5 kHz" },
    ]);
    const codes = result.warnings.map((x) => x.code);
    expect(codes).not.toContain("unit_assumed"); // the units row gave rpm
    expect(codes).not.toContain("stated_rate_mismatch"); // 5 kHz stated, 5 kHz in the time column
  });
  it("without the flags, the error names the real header, not the preamble", () => {
    const r = run(file);
    expect(r.code).toBe(1);
    expect(r.stderr).toContain('"t", "n_kw", "n_ge", "gear"');
    expect(r.stderr).not.toContain("Recorder");
  });
});
