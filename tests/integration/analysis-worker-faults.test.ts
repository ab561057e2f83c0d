import { eq } from "drizzle-orm";
import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyses, analysisJobs, driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { analyseSource } from "~/lib/signal";
import { localBlobStore } from "~/lib/infra/storage.server";
import { vehicleSchema } from "~/lib/domain/vehicle-schema";
import { createAnalysisPool } from "~/lib/infra/worker-pool.server";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// A database and storage of its own: no other server's runner may take these jobs.
const testbed = await useJobTestbed("workerfaults");
const { claimJob, failJob, retryJob, STALE_AFTER_MS } = await import("~/lib/analyses/queue.server");
const { saveAnalysis } = await import("~/lib/analyses/save.server");
const { startJobRunner } = await import("~/lib/analyses/runner.server");
const { recordDriveLog } = await import("~/lib/data/drive-log-intake.server");
const { db, pool } = await import("~/lib/infra/db.server");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { createTestTeam } = await import("../support/accounts");

// A worker that throws or runs out of memory on one file fails that job with a message, and
// neither the server nor the next job notices.

const csv = analyticIdleCsv({ ...IDLE_800, durationS: 4 });
let team: Awaited<ReturnType<typeof createTestTeam>>;
let data: ReturnType<typeof vehicleData>;
let vehicleId: number;

beforeAll(async () => {
  team = await createTestTeam("Worker faults");
  data = vehicleData(team.id);
  vehicleId = await data.create(
    vehicleSchema.parse({ name: "Fault car", identifier: "K-WF-1", cylinders: 4, stroke: 4 }),
  );
});
afterAll(async () => {
  await pool.end();
  await testbed.close();
});

async function addLog(text: string) {
  const stored = await localBlobStore(testbed.storage).put(Readable.from([Buffer.from(text)]));
  const { id } = await recordDriveLog(data.teamId, {
    vehicle: await data.vehicle(vehicleId),
    fileName: "fault.csv",
    stored,
    metadata: { condition: "idle-neutral", notes: "" },
    uploadedBy: null,
  });
  return id;
}

const logRow = async (id: number) =>
  (await db.select().from(driveLogs).where(eq(driveLogs.id, id)))[0]!;
const versionsOf = async (id: number) =>
  (await db.select({ v: analyses.version }).from(analyses).where(eq(analyses.driveLogId, id)))
    .length;

async function settled(ids: number[], read: (id: number) => Promise<{ status: string }>) {
  let rows: { status: string }[] = [];
  for (let i = 0; i < 300; i++) {
    rows = await Promise.all(ids.map(read));
    if (rows.every((r) => r.status === "done" || r.status === "failed")) return rows;
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`drive logs ${ids.join(", ")} did not finish: ${rows.map((r) => r.status)}`);
}

describe("analysis worker faults", () => {
  it(
    "a runaway file and a throwing one fail with a message each; the next job in the same pool is done",
    { timeout: 120_000 },
    async () => {
      // The real memory limit of the pool; only the runaway's allocation is staged (tests/support/faulty.worker.ts).
      const workers = createAnalysisPool({
        maxThreads: 1,
        memoryMb: 64,
        filename: fileURLToPath(new URL("../support/faulty.worker.ts", import.meta.url)),
      });
      const runaway = await addLog("# runaway\n" + csv);
      const thrower = await addLog("# throw\n" + csv);
      const fine = await addLog(csv);
      // No more jobs in flight than threads: a job waiting in piscina's own queue is stranded
      // when the worker ahead of it dies.
      let inFlight = 0;
      let mostInFlight = 0;
      const run = workers.run.bind(workers);
      workers.run = (task, options) => {
        mostInFlight = Math.max(mostInFlight, ++inFlight);
        return run(task, options).finally(() => inFlight--);
      };
      const runner = startJobRunner({ db, pool: workers, blobRoot: testbed.storage, pollMs: 50 });
      try {
        const [a, b, c] = (await settled([runaway, thrower, fine], logRow)) as Awaited<
          ReturnType<typeof logRow>
        >[];
        expect(a).toMatchObject({ status: "failed", error: { code: "analysis_out_of_memory" } });
        expect(a!.error!.message).toMatch(
          /^the analysis ran out of memory \(limit 64 MB per analysis\)/,
        );
        expect(b).toMatchObject({ status: "failed", error: { code: "analysis_crashed" } });
        expect(b!.error!.message).toContain(
          "RangeError: injected: the pipeline threw on this file",
        );
        expect(c).toMatchObject({ status: "done", error: null });
        expect(await versionsOf(runaway)).toBe(0);
        expect(await versionsOf(thrower)).toBe(0);
        expect(await versionsOf(fine)).toBe(1);
        expect(mostInFlight).toBe(1);
        const jobs = await db
          .select()
          .from(analysisJobs)
          .where(eq(analysisJobs.driveLogId, runaway));
        expect(jobs[0]?.lastError).toMatch(/^analysis_out_of_memory: /);
      } finally {
        await runner.stop();
        await workers.destroy();
      }
    },
  );

  it(
    "the production server with a tiny worker heap limit fails each job with the memory message and keeps serving",
    { timeout: 120_000 },
    async () => {
      // 8 MB is below what the worker needs to analyse any drive log (about 16 MB of heap, measured
      // with `npm run analyse` under --max-old-space-size), so the real limit ends the real worker.
      const server = await startServer({ ...testbed.serverEnv, ANALYSIS_WORKER_MEMORY_MB: "8" });
      try {
        const { token } = await createApiToken({
          userId: team.accounts.technician.id,
          teamId: team.id,
          name: "worker faults",
          expiresAt: null,
        });
        const api = (path: string, init: RequestInit = {}) =>
          fetch(`${server.url}${path}`, { ...init, headers: { Authorization: `Bearer ${token}` } });
        const ids: number[] = [];
        for (const name of ["first.csv", "second.csv"]) {
          const form = new FormData();
          form.set("file", new Blob([csv + "\n".repeat(ids.length)], { type: "text/csv" }), name);
          form.set("condition", "idle-neutral");
          const r = await api(`/api/v1/vehicles/${vehicleId}/logs`, { method: "POST", body: form });
          expect(r.status).toBe(202);
          ids.push(((await r.json()) as { log: { id: number } }).log.id);
        }
        const logs = await settled(ids, async (id) => {
          const r = await api(`/api/v1/logs/${id}`);
          return (
            (await r.json()) as {
              log: { status: string; error: { code: string; message: string } | null };
            }
          ).log;
        });
        for (const log of logs as { status: string; error: { code: string; message: string } }[]) {
          expect(log.status).toBe("failed");
          expect(log.error.code).toBe("analysis_out_of_memory");
          expect(log.error.message).toContain("ran out of memory (limit 8 MB per analysis)");
        }
        // The second job ran after the first one's worker died, and the server still answers.
        const health = await fetch(`${server.url}/healthz`);
        expect(health.status).toBe(200);
        expect(await health.json()).toEqual({ ok: true, db: "up" });
        expect((await api(`/api/v1/vehicles/${vehicleId}/logs`)).status).toBe(200);
      } finally {
        await server.stop();
      }
    },
  );

  it(
    "a claim that lost its job (claimed again after its heartbeat went stale) writes nothing",
    { timeout: 120_000 },
    async () => {
      const logId = await addLog(csv + "\n\n\n");
      // An instance claims it, then loses the database for longer than STALE_AFTER_MS.
      const lost = await claimJob(db, "cut-off#1", new Date(Date.now() - 2 * STALE_AFTER_MS));
      expect(lost?.driveLogId).toBe(logId);
      const workers = createAnalysisPool({ maxThreads: 1 });
      const runner = startJobRunner({ db, pool: workers, blobRoot: testbed.storage, pollMs: 50 });
      try {
        await settled([logId], logRow);
      } finally {
        await runner.stop();
        await workers.destroy();
      }
      expect(await logRow(logId)).toMatchObject({ status: "done" });
      // The cut-off instance comes back with its own finished result, or with its save's error.
      const direct = await analyseSource({
        source: Readable.from([csv]),
        ingest: {},
        analysis: {},
      });
      expect(direct.ok).toBe(true);
      if (!direct.ok) return;
      expect(await saveAnalysis(db, lost!, direct.value.result)).toBeNull();
      expect(await retryJob(db, lost!, "connection lost")).toBe("superseded");
      await failJob(db, lost!, { code: "save_failed", message: "connection lost" });
      expect(await versionsOf(logId)).toBe(1);
      expect(await logRow(logId)).toMatchObject({ status: "done", error: null });
      const [job] = await db.select().from(analysisJobs).where(eq(analysisJobs.driveLogId, logId));
      expect(job).toMatchObject({ status: "done", attempts: 0 });
    },
  );
});
