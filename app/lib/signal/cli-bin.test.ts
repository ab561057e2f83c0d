import { execFileSync, spawnSync } from "node:child_process";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { beforeAll, describe, expect, it } from "vitest";
import { writeBenchLog } from "../../../bench/drive-log.ts";
import { cliTempDir, runCli } from "../../../tests/support/cli-process.ts";
import { analyseSource } from "./pipeline.ts";

// The compiled `twistlog` command (bin/twistlog.mjs running build/cli, scripts/build-cli.mjs)
// as a user runs it, on the bench's synthetic log cut to 60 s (9 MB: read on two threads).
// Several whole processes per test on a shared machine: a generous timeout, not a speed check.
const SLOW = { timeout: 300_000 };
const root = fileURLToPath(new URL("../../..", import.meta.url));
const bin = join(root, "bin/twistlog.mjs");
const dir = cliTempDir("twistlog-bin-");
const log = join(dir, "bench-60s.csv");

function twistlog(...args: string[]) {
  const r = spawnSync(process.execPath, [bin, ...args], { encoding: "utf8", timeout: 120_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

beforeAll(() => {
  // The bundle of the source under test (npm ci and npm run build make it too).
  execFileSync(process.execPath, [join(root, "scripts/build-cli.mjs")], { stdio: "inherit" });
  writeBenchLog(log, { durationS: 60, sampleRateHz: 5000, order: 2 });
}, SLOW.timeout);

describe("the compiled twistlog command", SLOW, () => {
  it("prints the same result document as the tsx CLI and the one-thread pipeline", async () => {
    const compiled = twistlog("analyse", log, "--json");
    expect(compiled.stderr).toBe("");
    expect(compiled.code).toBe(0);
    expect(twistlog(log, "--json").stdout).toBe(compiled.stdout); // `twistlog FILE` too
    const tsx = runCli(log, "--json");
    expect(tsx.code).toBe(0);
    expect(compiled.stdout).toBe(tsx.stdout);
    // The one-thread ingest through pipeline.ts, in this process: the same document.
    const one = await analyseSource({ source: log, ingest: {}, analysis: {} });
    expect(one.ok).toBe(true);
    expect(compiled.stdout).toBe(`${JSON.stringify(one.ok && one.value.result)}\n`);
  });

  it("agrees with the numpy reference's isolation at 4200 rpm", () => {
    // Outside reference: bench/reference/order_track.py (an independent numpy computed order
    // tracking) on this same generated log printed "4200 rpm 30.91 dB (178 blocks)" (numpy
    // 2.4.6); the two differ in interpolation, low-pass and detrend, so 0.05 dB is allowed.
    const r = twistlog("analyse", log, "--json");
    const doc = JSON.parse(r.stdout) as { isolation: { rpm: number; dB: number }[] };
    const at = doc.isolation.find((p) => p.rpm === 4200);
    expect(at).toBeDefined();
    expect(Math.abs((at?.dB ?? NaN) - 30.91)).toBeLessThanOrEqual(0.05);
  });

  it("answers --help and a bad flag like `npm run analyse`", () => {
    const help = twistlog("--help");
    expect(help.code).toBe(0);
    expect(help.stdout).toContain("--list-channels");
    const bad = twistlog("analyse", log, "--cylinders", "0");
    expect(bad.code).toBe(2);
    expect(bad.stderr).toContain("--cylinders needs a positive whole number");
  });
});
