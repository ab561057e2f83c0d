/**
 * `tsx bench/reanalyse.bench.ts`: "re-analyse all" of a vehicle's 50 drive logs through the real
 * server (issue 17, goal 3: every worker used, the batch within 1.2 × 50 × one analysis ÷ workers).
 *
 * Five generated drive logs of realistic size (60–64 s at 5 kHz, about 9 MB each, bench/drive-log.ts)
 * are stored once and recorded ten times each through the data layer (50 drive logs, no
 * analysis yet). One of them has a damper variant of its own, so POST /api/v1/vehicles/:id/reanalyse
 * with that variant times one job alone (from the request to `finished`, median of 3); then the
 * same without a variant re-analyses all 50 (one job alone is timed 3 times before and 2 times
 * after the batch, after one uncounted warm-up; the median). Printed: one job alone, the worker's own time of it,
 * the batch's wall time, ideal = 50 × one ÷ workers, their ratio (goal ≤ 1.2) and the workers'
 * utilisation (their summed run time ÷ (wall × workers), from the server's ANALYSIS_TIMINGS lines).
 * It starts a MariaDB of its own (BENCH_DATABASE_PORT + 3, default 3471) and builds the app first
 * when build/ is missing.
 */
import { availableParallelism, loadavg } from "node:os";
import { createReadStream } from "node:fs";
import { join } from "node:path";
import {
  benchSetup,
  benchTeam,
  cleanUp,
  prepareDatabaseAndBuild,
  root,
  startBenchServer,
  type BenchServer,
} from "./bench-server.ts";
import type { JobTimings } from "../app/lib/analyses/runner.server.ts";
import { ratioLine } from "./goal-lines.ts";

const LOGS = 50;
const FILES = 5;
const GOAL_RATIO = 1.2;
const setup = benchSetup("reanalyse", 3, { ANALYSIS_TIMINGS: "1" });
const { dir, run } = setup;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const s = (ms: number) => `${(ms / 1000).toFixed(2)} s`;

let server: BenchServer | undefined;
try {
  const files = Array.from({ length: FILES }, (_, i) => join(dir, `reanalyse-${i}.csv`));
  for (const [i, file] of files.entries())
    run(process.execPath, [
      "--import",
      "tsx",
      join(root, "bench/drive-log.ts"),
      file,
      String(60 + i),
      "5000",
    ]);
  prepareDatabaseAndBuild(setup);

  // Settings are in process.env now, so the app modules use the bench database and storage.
  const { vehicleData } = await import("../app/lib/data/vehicles.server.ts");
  const { vehicleSchema } = await import("../app/lib/domain/vehicle-schema.ts");
  const { blobStore } = await import("../app/lib/infra/storage-settings.server.ts");
  const { db, pool } = await import("../app/lib/infra/db.server.ts");
  const { driveLogs } = await import("../app/lib/infra/db/schema-drive-logs.ts");
  const { createApiToken } = await import("../app/lib/data/api-tokens.server.ts");
  const { eq } = await import("drizzle-orm");
  const { team } = await benchTeam("Reanalyse");
  const { token } = await createApiToken({
    userId: team.accounts.engineer.id,
    teamId: team.id,
    name: "reanalyse bench engineer",
    expiresAt: null,
  });
  const data = vehicleData(team.id);
  const vehicleId = await data.create(
    vehicleSchema.parse({ name: "Batch car", identifier: "B-50", cylinders: 4, stroke: 4 }),
  );
  const vehicle = await data.vehicle(vehicleId);
  const stored: Awaited<ReturnType<ReturnType<typeof blobStore>["put"]>>[] = [];
  for (const file of files) stored.push(await blobStore().put(createReadStream(file)));
  const added = await data.addLogs({
    vehicle,
    files: Array.from({ length: LOGS }, (_, i) => ({
      fileName: `run-${String(i + 1).padStart(2, "0")}.csv`,
      stored: stored[i % FILES]!,
    })),
    metadata: { condition: "run-up", notes: "", damperVariant: "A" },
    uploadedBy: null,
  });
  // Recorded without a job: mark them settled, and give the first a variant of its own.
  await db.update(driveLogs).set({ status: "done" }).where(eq(driveLogs.vehicleId, vehicleId));
  await db.update(driveLogs).set({ damperVariant: "solo" }).where(eq(driveLogs.id, added[0]!.id));

  server = await startBenchServer(setup);
  const { base } = server;
  const timings: JobTimings[] = [];
  server.process.stdout!.on("data", (d: Buffer) => {
    for (const m of d.toString().matchAll(/analysis timings: (\{.*\})/g))
      timings.push(JSON.parse(m[1]!) as JobTimings);
  });
  const auth = { Authorization: `Bearer ${token}` };

  /** Re-analyses (all, or one variant) and waits until the batch has finished; wall ms. */
  async function batch(body: object): Promise<{ ms: number; jobIds: number[] }> {
    const t0 = performance.now();
    const r = await fetch(`${base}/api/v1/vehicles/${vehicleId}/reanalyse`, {
      method: "POST",
      headers: { ...auth, "Content-Type": "application/json" },
      body: JSON.stringify(body),
    });
    if (r.status !== 202) throw new Error(`re-analyse answered ${r.status}: ${await r.text()}`);
    const { batchId, jobs } = (await r.json()) as { batchId: string; jobs: { jobId: number }[] };
    for (;;) {
      await new Promise((resolve) => setTimeout(resolve, 25));
      const p = await fetch(`${base}/api/v1/vehicles/${vehicleId}/reanalyse/${batchId}`, {
        headers: auth,
      });
      const progress = (await p.json()) as { finished: boolean; failed: number };
      if (progress.finished) {
        if (progress.failed) throw new Error(`${progress.failed} jobs of the batch failed`);
        return { ms: performance.now() - t0, jobIds: jobs.map((j) => j.jobId) };
      }
    }
  }
  const byJob = (ids: number[]) => {
    const wanted = new Set(ids);
    return timings.filter((t) => wanted.has(t.jobId));
  };

  // One job alone, three times before the batch and twice after (a shared machine drifts).
  const alone: number[] = [];
  const aloneWorker: number[] = [];
  const soloRun = async (i: number) => {
    const one = await batch({ binRpm: 50 + i, damperVariant: "solo" });
    alone.push(one.ms);
    aloneWorker.push(...byJob(one.jobIds).map((t) => t.analysisMs));
  };
  await batch({ binRpm: 45, damperVariant: "solo" }); // warm-up (the server just started): not counted
  for (let i = 0; i < 3; i++) await soloRun(i);
  const loadBefore = loadavg()[0]!;
  const all = await batch({ binRpm: 40 });
  const loadAfter = loadavg()[0]!;
  for (let i = 3; i < 5; i++) await soloRun(i);
  await pool.end();

  const workers = Math.max(1, availableParallelism() - 1); // the server's pool (worker-pool.server.ts)
  const one = median(alone);
  const ideal = (LOGS * one) / workers;
  const ran = byJob(all.jobIds);
  const busy = ran.reduce((sum, t) => sum + t.analysisMs, 0);
  console.log(
    `\nre-analyse all: ${LOGS} drive logs (${FILES} files, 60–64 s at 5 kHz), ${workers} worker(s)`,
  );
  console.log(
    `  one job alone (request → finished)      ${s(one)}   (median of 5: ${alone.map(s).join(", ")})`,
  );
  console.log(`    of which the worker's own run          ${s(median(aloneWorker))}`);
  console.log(
    `  all ${LOGS} (request → finished)           ${s(all.ms)}   (load average ${loadBefore.toFixed(1)} → ${loadAfter.toFixed(1)} on ${availableParallelism()} cores)`,
  );
  console.log(`  ideal = ${LOGS} × one ÷ ${workers}`.padEnd(42) + s(ideal));
  console.log(
    `  ratio wall / ideal                      ${(all.ms / ideal).toFixed(2)}   (goal ≤ ${GOAL_RATIO})`,
  );
  ratioLine(
    "3",
    `re-analyse all ${LOGS} logs vs ${LOGS} × one ÷ ${workers} worker(s)`,
    all.ms / 1000,
    "s",
    ideal / 1000,
    `≤ ${GOAL_RATIO}`,
  );
  console.log(
    `  worker utilisation                      ${((100 * busy) / (all.ms * workers)).toFixed(0)} %   (${ran.length} jobs timed; summed worker run ${s(busy)}, ${s(busy / ran.length)} per job)`,
  );
  console.log(
    `  per job, median: worker start ${s(median(ran.map((t) => t.workerStartMs)))}, column choice ${s(median(ran.map((t) => t.columnsMs)))}, save ${s(median(ran.map((t) => t.saveMs)))} (beside the next job's run)`,
  );
} finally {
  await cleanUp(setup, server);
}
