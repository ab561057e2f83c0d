/**
 * `npm run bench`: writes a 10-minute, 5 kHz, two-channel drive log (3 million rows, about
 * 90 MB) to a temporary folder, runs the CLI pipeline on it in-process (analyseSource, the same
 * function the CLI calls) and prints rows/s, MB/s, wall time per stage and peak RSS.
 * Goal on the 2-core reference machine: whole analysis < 1.5 s, peak RSS < 270 MB.
 *
 * Then the same analysis with the transient path off (AnalysisOptions.transients = false: no
 * order filter, events or twist) and the ratio of the two analysis times (track + spectra +
 * results, parse excluded), so the fast path is seen not to slow the steady one.
 *
 * BENCH_FILE=path reuses an existing log (for profiling with node --cpu-prof).
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { analyseSource, type PipelineStage } from "../app/lib/signal/pipeline.ts";

const DURATION_S = 600;
const RATE_HZ = 5000;
const GOAL_S = 1.5;
const GOAL_RSS_MB = 270;

const reuse = process.env.BENCH_FILE;
const dir = reuse ? undefined : mkdtempSync(join(tmpdir(), "twistlog-bench-"));
const file = reuse ?? join(dir ?? "", "bench-drive-log.csv");
try {
  if (!reuse) {
    const t0 = performance.now();
    // A child process writes the log, so its memory stays out of this process's peak RSS.
    const generator = fileURLToPath(new URL("./drive-log.ts", import.meta.url));
    execFileSync(
      process.execPath,
      ["--import", "tsx", generator, file, String(DURATION_S), String(RATE_HZ)],
      { stdio: ["ignore", "ignore", "inherit"] },
    );
    console.log(
      `generated ${file} in ${((performance.now() - t0) / 1000).toFixed(1)} s (not timed below)`,
    );
  }
  const bytes = statSync(file).size;
  const rssBeforeMB = process.resourceUsage().maxRSS / 1024;

  const starts = new Map<PipelineStage, number>();
  const rssAt = new Map<PipelineStage, number>(); // resident MB when each stage starts
  const t0 = performance.now();
  const outcome = await analyseSource({ source: file, ingest: {}, analysis: {} }, (stage) => {
    if (!starts.has(stage)) {
      starts.set(stage, performance.now());
      rssAt.set(stage, process.memoryUsage.rss() / 2 ** 20);
    }
  });
  const t1 = performance.now();
  if (!outcome.ok) throw new Error(`${outcome.error.code}: ${outcome.error.message}`);
  const json = JSON.stringify(outcome.value.result);
  const t2 = performance.now();
  const rows = outcome.value.log.source.rows;
  const peakMB = process.resourceUsage().maxRSS / 1024;

  const order: PipelineStage[] = ["parse", "track", "spectra", "results"];
  const seen = order.filter((s) => starts.has(s));
  const stageMs = seen.map((s, i) => {
    const end = i + 1 < seen.length ? (starts.get(seen[i + 1] as PipelineStage) ?? t1) : t1;
    return [s, end - (starts.get(s) ?? t0)] as const;
  });
  const parseS = (stageMs.find(([s]) => s === "parse")?.[1] ?? 0) / 1000;
  const totalS = (t1 - t0) / 1000;

  console.log(
    `\nlog: ${rows.toLocaleString("en")} rows, ${(bytes / 1e6).toFixed(1)} MB, ${outcome.value.result.durationS.toFixed(0)} s at ${outcome.value.result.sampleRateHz.toFixed(0)} Hz`,
  );
  for (const [s, ms] of stageMs) {
    const rss = rssAt.get(s);
    console.log(
      `  ${s.padEnd(8)} ${ms.toFixed(0).padStart(6)} ms   (RSS ${rss?.toFixed(0) ?? "?"} MB at its start)`,
    );
  }
  console.log(
    `  ${"total".padEnd(8)} ${(totalS * 1000).toFixed(0).padStart(6)} ms   (goal < ${GOAL_S * 1000} ms: ${totalS < GOAL_S ? "met" : "NOT met"})`,
  );
  console.log(
    `  ${"JSON".padEnd(8)} ${(t2 - t1).toFixed(0).padStart(6)} ms   (${(json.length / 1e6).toFixed(2)} MB result document, not in the total)`,
  );
  console.log(
    `parse: ${(rows / parseS / 1e6).toFixed(2)} M rows/s, ${(bytes / 1e6 / parseS).toFixed(0)} MB/s`,
  );
  console.log(
    `whole pipeline: ${(rows / totalS / 1e6).toFixed(2)} M rows/s, ${(bytes / 1e6 / totalS).toFixed(0)} MB/s`,
  );
  console.log(
    `peak RSS: ${peakMB.toFixed(0)} MB (goal < ${GOAL_RSS_MB} MB: ${peakMB < GOAL_RSS_MB ? "met" : "NOT met"}; ${rssBeforeMB.toFixed(0)} MB before the analysis)`,
  );
  console.log(`warnings: ${outcome.value.result.warnings.map((w) => w.code).join(", ") || "none"}`);
  const transient = outcome.value.result.transient;
  console.log(
    `transients: ${transient?.spans.length ?? 0} fast spans, ${outcome.value.result.events?.length ?? 0} events`,
  );

  // The analysis alone (from the first stage after parse to the end), transients on and off.
  const analysisMs = async (analysis: { transients?: boolean }) => {
    let from = 0;
    const t = performance.now();
    const out = await analyseSource({ source: file, ingest: {}, analysis }, (stage) => {
      if (stage !== "parse" && from === 0) from = performance.now();
    });
    if (!out.ok) throw new Error(`${out.error.code}: ${out.error.message}`);
    return performance.now() - (from || t);
  };
  // Interleaved, best of two each: the machine may be shared, so single runs vary.
  let on = Infinity;
  let off = Infinity;
  for (let k = 0; k < 2; k++) {
    off = Math.min(off, await analysisMs({ transients: false }));
    on = Math.min(on, await analysisMs({}));
  }
  console.log(
    `analysis without parse: transients on ${on.toFixed(0)} ms, off ${off.toFixed(0)} ms, on/off ${(on / off).toFixed(2)}`,
  );
} finally {
  if (dir) rmSync(dir, { recursive: true, force: true });
}
