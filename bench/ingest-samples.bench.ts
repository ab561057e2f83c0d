/**
 * `npx tsx bench/ingest-samples.bench.ts`: the memory of the spooled ingest (ingestSamples,
 * docs/signal-ingest.md "Spooled ingest") against the batch ingest (ingestFile). Writes two
 * logs with the generator of bench/drive-log.ts (5 kHz, two channels) to a temporary folder:
 * ~100 MB (680 s, 3.4 M rows) and ~1 GiB (6800 s, 34 M rows, the upload limit). Each run is
 * a child process of its own, so its peak RSS (process.resourceUsage().maxRSS) is its own:
 * the spooled ingest of both logs, each read through once in 1 M-sample windows, and the batch
 * ingest of the 100 MB log (the batch ingest of the 1 GiB log needs about 1 GB; BENCH_BATCH_1G=1
 * runs it too). Prints rows/s, wall time and peak RSS, the median of 3 runs (RUNS=n to change).
 * Goal: the spooled ingest of the 1 GiB log peaks at ≤ 100 MB. The folder is removed at the
 * end, also on error.
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

const RATE_HZ = 5000;
const GOAL_MB = 100;
const WINDOW = 1 << 20;

interface Run {
  rows: number;
  wallS: number;
  peakMB: number;
  /** Sum of the crank samples read back (the read-through is not optimised away). */
  check: number;
}

/** One measured run in this process: `mode` is "spool" or "batch". */
async function child(mode: string, file: string): Promise<Run> {
  if (mode === "none")
    return { rows: 0, wallS: 0, peakMB: process.resourceUsage().maxRSS / 1024, check: 0 };
  const { ingestSamples } = await import("../app/lib/signal/ingest-samples.ts");
  const { ingestFile } = await import("../app/lib/signal/ingest-stream.ts");
  const t0 = performance.now();
  let rows = 0;
  let check = 0;
  if (mode === "spool") {
    const r = await ingestSamples(file);
    if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message}`);
    const src = r.value;
    try {
      rows = src.length;
      for (let a = 0; a < src.length; a += WINDOW) {
        const w = src.read(a, a + WINDOW);
        for (let i = 0; i < w.crankRadS.length; i++) check += w.crankRadS[i]!;
      }
    } finally {
      src.close();
    }
  } else {
    const r = await ingestFile(file);
    if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message}`);
    rows = r.value.timeS.length;
    for (let i = 0; i < rows; i++) check += r.value.crankRadS[i]!;
  }
  const wallS = (performance.now() - t0) / 1000;
  return { rows, wallS, peakMB: process.resourceUsage().maxRSS / 1024, check };
}

const self = fileURLToPath(import.meta.url);
/** How a child runs: this file bundled to plain JavaScript (no transpiler in the process), or tsx. */
let childArgs = ["--import", "tsx", self];

/**
 * Bundles this file with esbuild (vite's and tsx's bundler, in node_modules) so the children run
 * as a compiled program would: tsx alone adds ~35 MB of resident memory to every process.
 */
async function bundleChild(dir: string): Promise<string> {
  try {
    const { buildSync } = await import("esbuild");
    const outfile = join(dir, "child.mjs");
    buildSync({ entryPoints: [self], bundle: true, platform: "node", format: "esm", outfile });
    childArgs = [outfile];
    return "bundled to JavaScript with esbuild";
  } catch (e) {
    return `through tsx (bundling failed: ${e instanceof Error ? e.message : String(e)})`;
  }
}

function measure(mode: string, file: string, runs: number): Run {
  const all: Run[] = [];
  for (let k = 0; k < runs; k++) {
    const out = execFileSync(process.execPath, [...childArgs, "--child", mode, file], {
      encoding: "utf8",
      stdio: ["ignore", "pipe", "inherit"],
      maxBuffer: 1 << 20,
    });
    all.push(JSON.parse(out.trim().split("\n").pop() ?? "{}") as Run);
  }
  const median = (f: (r: Run) => number) => all.map(f).sort((a, b) => a - b)[runs >> 1]!;
  return {
    rows: all[0]!.rows,
    wallS: median((r) => r.wallS),
    peakMB: median((r) => r.peakMB),
    check: all[0]!.check,
  };
}

async function main(): Promise<void> {
  const runs = Number(process.env.RUNS ?? 3);
  const dir = mkdtempSync(join(tmpdir(), "twistlog-bench-samples-"));
  const cleanup = () => rmSync(dir, { recursive: true, force: true });
  process.once("SIGINT", () => {
    cleanup();
    process.exit(130);
  });
  try {
    const how = await bundleChild(dir);
    const generator = fileURLToPath(new URL("./drive-log.ts", import.meta.url));
    const logs = [
      { name: "100 MB", file: join(dir, "log-100m.csv"), durationS: 680 },
      { name: "1 GiB", file: join(dir, "log-1g.csv"), durationS: 6800 },
    ];
    for (const l of logs) {
      const t0 = performance.now();
      execFileSync(
        process.execPath,
        ["--import", "tsx", generator, l.file, String(l.durationS), String(RATE_HZ)],
        { stdio: ["ignore", "ignore", "inherit"] },
      );
      const mb = statSync(l.file).size / 1e6;
      const s = ((performance.now() - t0) / 1000).toFixed(0);
      console.log(`generated the ${l.name} log (${mb.toFixed(0)} MB) in ${s} s (not timed below)`);
    }
    const line = (what: string, r: Run) =>
      console.log(
        `${what.padEnd(34)} ${(r.rows / 1e6).toFixed(1).padStart(5)} M rows  ${r.wallS.toFixed(1).padStart(6)} s  ${(r.rows / r.wallS / 1e6).toFixed(2)} M rows/s  peak RSS ${r.peakMB.toFixed(0).padStart(5)} MB`,
      );
    console.log(
      `median of ${runs} runs, each in a process of its own, ${how} (2 shared cores: noisy)`,
    );
    console.log(
      `the process with the code loaded, no log: peak RSS ${measure("none", "", 1).peakMB.toFixed(0)} MB`,
    );
    const batch100 = measure("batch", logs[0]!.file, runs);
    line("batch ingestFile, 100 MB", batch100);
    const spool100 = measure("spool", logs[0]!.file, runs);
    line("spooled ingestSamples + read, 100 MB", spool100);
    const spool1g = measure("spool", logs[1]!.file, runs);
    line("spooled ingestSamples + read, 1 GiB", spool1g);
    if (process.env.BENCH_BATCH_1G === "1")
      line("batch ingestFile, 1 GiB", measure("batch", logs[1]!.file, 1));
    console.log(
      `goal: spooled peak RSS for 1 GiB ≤ ${GOAL_MB} MB: ${spool1g.peakMB.toFixed(0)} MB (${spool1g.peakMB <= GOAL_MB ? "met" : "not met"}); ` +
        `1 GiB / 100 MB spooled peak ratio ${(spool1g.peakMB / spool100.peakMB).toFixed(2)}; ` +
        `spooled / batch peak at 100 MB ${(spool100.peakMB / batch100.peakMB).toFixed(2)}`,
    );
  } finally {
    cleanup();
  }
}

if (process.argv[2] === "--child") {
  const r = await child(process.argv[3] ?? "spool", process.argv[4] ?? "");
  process.stdout.write(`${JSON.stringify(r)}\n`);
} else {
  await main();
}
