/**
 * `npx tsx bench/ingest-samples.bench.ts`: the memory of the spooled ingest (ingestSamples,
 * docs/signal-ingest.md "Spooled ingest") against the batch ingest (ingestFile). Writes two
 * logs with the generator of bench/drive-log.ts (5 kHz, two channels) to a temporary folder:
 * ~100 MB (680 s, 3.4 M rows) and ~1 GiB (6800 s, 34 M rows, the upload limit), and the same
 * samples as MDF4 (bench/mdf4-log.ts; BENCH_MDF4=0 leaves them out). Each run is a child
 * process of its own, so its peak RSS (process.resourceUsage().maxRSS) is its own: the spooled
 * ingest of every log, then a read-through in 1 M-sample windows, and the batch ingest of the
 * small logs (of the large ones it needs about 1 GB; BENCH_BATCH_1G=1 runs it too). Prints
 * rows/s, time and peak RSS after the ingest and after the read-through, the median of 3 runs
 * (RUNS=n to change). Goal: the spooled ingest of the 1 GiB CSV peaks at ≤ 100 MB. The folder
 * is removed at the end, also on error.
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
  /** Time and peak RSS when the ingest returned (before the read-through). */
  ingestS: number;
  ingestPeakMB: number;
  /** Sum of the crank samples read back (the read-through is not optimised away). */
  check: number;
}

/** One measured run in this process: `mode` is "spool" or "batch". */
async function child(mode: string, file: string): Promise<Run> {
  const peak = () => process.resourceUsage().maxRSS / 1024;
  if (mode === "none")
    return { rows: 0, wallS: 0, peakMB: peak(), ingestS: 0, ingestPeakMB: peak(), check: 0 };
  const { ingestSamples } = await import("../app/lib/signal/ingest-samples.ts");
  const { ingestFile } = await import("../app/lib/signal/ingest-stream.ts");
  const t0 = performance.now();
  let rows = 0;
  let check = 0;
  let ingestS = 0;
  let ingestPeakMB = 0;
  if (mode === "spool") {
    const r = await ingestSamples(file);
    ingestS = (performance.now() - t0) / 1000;
    ingestPeakMB = peak();
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
    ingestS = (performance.now() - t0) / 1000;
    ingestPeakMB = peak();
    if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message}`);
    rows = r.value.timeS.length;
    for (let i = 0; i < rows; i++) check += r.value.crankRadS[i]!;
  }
  const wallS = (performance.now() - t0) / 1000;
  return { rows, wallS, peakMB: peak(), ingestS, ingestPeakMB, check };
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
    ingestS: median((r) => r.ingestS),
    ingestPeakMB: median((r) => r.ingestPeakMB),
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
    const mdfGenerator = fileURLToPath(new URL("./mdf4-log.ts", import.meta.url));
    const logs = [
      { name: "100 MB CSV", file: join(dir, "log-100m.csv"), durationS: 680, gen: generator },
      { name: "1 GiB CSV", file: join(dir, "log-1g.csv"), durationS: 6800, gen: generator },
      {
        name: "MDF4, 3.4 M rows",
        file: join(dir, "log-100m.mf4"),
        durationS: 680,
        gen: mdfGenerator,
      },
      {
        name: "MDF4, 34 M rows",
        file: join(dir, "log-1g.mf4"),
        durationS: 6800,
        gen: mdfGenerator,
      },
    ];
    if (process.env.BENCH_MDF4 === "0") logs.splice(2);
    for (const l of logs) {
      const t0 = performance.now();
      execFileSync(
        process.execPath,
        ["--import", "tsx", l.gen, l.file, String(l.durationS), String(RATE_HZ)],
        { stdio: ["ignore", "ignore", "inherit"] },
      );
      const mb = statSync(l.file).size / 1e6;
      const s = ((performance.now() - t0) / 1000).toFixed(0);
      console.log(`generated the ${l.name} log (${mb.toFixed(0)} MB) in ${s} s (not timed below)`);
    }
    const line = (what: string, r: Run) =>
      console.log(
        `${what.padEnd(30)} ${(r.rows / 1e6).toFixed(1).padStart(5)} M rows  ingest ${r.ingestS.toFixed(1).padStart(5)} s ` +
          `(${(r.rows / r.ingestS / 1e6).toFixed(2)} M rows/s), peak RSS ${r.ingestPeakMB.toFixed(0).padStart(4)} MB; ` +
          `with the read-through ${r.wallS.toFixed(1).padStart(5)} s, peak RSS ${r.peakMB.toFixed(0).padStart(4)} MB`,
      );
    console.log(
      `median of ${runs} runs, each in a process of its own, ${how} (2 shared cores: noisy)`,
    );
    console.log(
      `the process with the code loaded, no log: peak RSS ${measure("none", "", 1).peakMB.toFixed(0)} MB`,
    );
    const results: Record<string, Run> = {};
    for (const l of logs) {
      const big = l.durationS > 1000;
      if (!big || process.env.BENCH_BATCH_1G === "1") {
        results[`batch ${l.name}`] = measure("batch", l.file, big ? 1 : runs);
        line(`batch (DriveLog), ${l.name}`, results[`batch ${l.name}`]!);
      }
      results[`spool ${l.name}`] = measure("spool", l.file, runs);
      line(`spooled, ${l.name}`, results[`spool ${l.name}`]!);
    }
    const csvBig = results["spool 1 GiB CSV"]!;
    const csvSmall = results["spool 100 MB CSV"]!;
    const batchSmall = results["batch 100 MB CSV"]!;
    console.log(
      `goal: spooled ingest peak RSS for the 1 GiB CSV ≤ ${GOAL_MB} MB: ${csvBig.ingestPeakMB.toFixed(0)} MB (${csvBig.ingestPeakMB <= GOAL_MB ? "met" : "not met"}); ` +
        `1 GiB / 100 MB spooled ingest peak ratio ${(csvBig.ingestPeakMB / csvSmall.ingestPeakMB).toFixed(2)}; ` +
        `spooled / batch ingest peak at 100 MB ${(csvSmall.ingestPeakMB / batchSmall.ingestPeakMB).toFixed(2)}, ` +
        `time ${(csvSmall.ingestS / batchSmall.ingestS).toFixed(2)}`,
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
