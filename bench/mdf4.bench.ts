/**
 * `npm run bench`, MDF4 case: the bench's drive log (10 minutes at 5 kHz, 3 million records,
 * the same samples as analyse.bench.ts' CSV) written as an MDF4 file (mdf4-log.ts), analysed
 * in-process with analyseSource like the CLI; prints the read rate in MB/s and the peak RSS.
 * Its own process, so the CSV case's memory does not count in its peak.
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, statSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { analyseSource, type PipelineStage } from "../app/lib/signal/pipeline.ts";

const DURATION_S = 600;
const RATE_HZ = 5000;

const dir = mkdtempSync(join(tmpdir(), "twistlog-bench-mdf4-"));
const file = join(dir, "bench-drive-log.mf4");
try {
  const t0 = performance.now();
  const generator = fileURLToPath(new URL("./mdf4-log.ts", import.meta.url));
  execFileSync(
    process.execPath,
    ["--import", "tsx", generator, file, String(DURATION_S), String(RATE_HZ)],
    { stdio: ["ignore", "ignore", "inherit"] },
  );
  console.log(
    `\ngenerated ${file} in ${((performance.now() - t0) / 1000).toFixed(1)} s (not timed below)`,
  );
  const bytes = statSync(file).size;
  const rssBeforeMB = process.resourceUsage().maxRSS / 1024;
  const starts = new Map<PipelineStage, number>();
  const cpuAt = new Map<PipelineStage, number>(); // CPU ms used when each stage starts
  const rssAt = new Map<PipelineStage, number>(); // resident MB when each stage starts
  const cpuMs = () => {
    const u = process.cpuUsage();
    return (u.user + u.system) / 1000;
  };
  const t1 = performance.now();
  const cpu1 = cpuMs();
  const outcome = await analyseSource({ source: file, ingest: {}, analysis: {} }, (stage) => {
    if (!starts.has(stage)) {
      starts.set(stage, performance.now());
      cpuAt.set(stage, cpuMs());
      rssAt.set(stage, process.memoryUsage.rss() / 2 ** 20);
    }
  });
  const cpu2 = cpuMs();
  const t2 = performance.now();
  if (!outcome.ok) throw new Error(`${outcome.error.code}: ${outcome.error.message}`);
  const peakMB = process.resourceUsage().maxRSS / 1024;
  const parseS = ((starts.get("track") ?? t2) - (starts.get("parse") ?? t1)) / 1000;
  const totalS = (t2 - t1) / 1000;
  const rows = outcome.value.log.source.rows;
  console.log(
    `MDF4 log: ${rows.toLocaleString("en")} records, ${(bytes / 1e6).toFixed(1)} MB (5 channels, 3 picked)`,
  );
  console.log(
    `  read    ${(parseS * 1000).toFixed(0).padStart(6)} ms   ${(bytes / 1e6 / parseS).toFixed(0)} MB/s, ${(rows / parseS / 1e6).toFixed(2)} M records/s`,
  );
  const readCpu = (cpuAt.get("track") ?? cpu2) - (cpuAt.get("parse") ?? cpu1);
  console.log(
    `          ${readCpu.toFixed(0).padStart(6)} ms CPU (all threads; the wall time above counts a busy machine too)`,
  );
  console.log(`  total   ${(totalS * 1000).toFixed(0).padStart(6)} ms   (read and analysis)`);
  console.log(
    `peak RSS: ${peakMB.toFixed(0)} MB (${rssBeforeMB.toFixed(0)} MB before the analysis, ${rssAt.get("track")?.toFixed(0) ?? "?"} MB once the file is read)`,
  );
  console.log(`warnings: ${outcome.value.result.warnings.map((w) => w.code).join(", ") || "none"}`);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
