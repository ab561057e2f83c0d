import { count, eq } from "drizzle-orm";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  analyses,
  analysisJobs,
  analysisSegments,
  driveLogs,
  isolationPoints,
  orderCurvePoints,
} from "~/lib/infra/db/schema-drive-logs";
import { localBlobStore } from "~/lib/infra/storage.server";
import { vehicleSchema } from "~/lib/domain/vehicle-schema";
import { createAnalysisPool } from "~/lib/infra/worker-pool.server";
import { analyticIdleCsv } from "../support/analytic-log";
import { useScratchDatabase } from "../support/scratch-db";

// A database of its own: runners of other test files' servers must not take these jobs.
const scratch = await useScratchDatabase("jobs");
const { claimJob, MAX_ATTEMPTS, STALE_AFTER_MS } = await import("~/lib/analyses/queue.server");
const { startJobRunner } = await import("~/lib/analyses/runner.server");
const { queueAnalysis } = await import("~/lib/analyses/requests.server");
const { recordDriveLog } = await import("~/lib/data/drive-log-intake.server");
const { db, pool } = await import("~/lib/infra/db.server");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { createTestTeam } = await import("../support/accounts");

// The job queue against the real MariaDB with a real worker pool: saving is all or nothing, a
// failed save is retried, an orphaned job is picked up again, a bad file leaves no analysis rows.

let blobRoot: string;
let workers: ReturnType<typeof createAnalysisPool>;
let data: ReturnType<typeof vehicleData>;
let vehicleId: number;
const csv = analyticIdleCsv({
  rpm: 800,
  order: 2,
  crankAmpRpm: 10,
  naturalHz: 12,
  zeta: 0.1,
  durationS: 6,
  sampleRateHz: 2000,
});

beforeAll(async () => {
  blobRoot = await mkdtemp(join(tmpdir(), "twistlog-jobs-"));
  workers = createAnalysisPool({ maxThreads: 1 });
  const team = await createTestTeam("Jobs");
  data = vehicleData(team.id);
  vehicleId = await data.create(
    vehicleSchema.parse({ name: "Queue car", identifier: "Q-1", cylinders: 4, stroke: 4 }),
  );
});
afterAll(async () => {
  await workers.destroy();
  await pool.end();
  await scratch.drop();
  await rm(blobRoot, { recursive: true, force: true });
});

async function addLog(text: string) {
  const stored = await localBlobStore(blobRoot).put(Readable.from([Buffer.from(text)]));
  const vehicle = await data.vehicle(vehicleId);
  const { id } = await recordDriveLog(data.teamId, {
    vehicle,
    fileName: "t.csv",
    stored,
    metadata: { condition: "idle-neutral", notes: "" },
    uploadedBy: null,
  });
  return id;
}

async function rowsFor(logId: number) {
  const ids = await db
    .select({ id: analyses.id })
    .from(analyses)
    .where(eq(analyses.driveLogId, logId));
  const counts = { analyses: ids.length, isolation: 0, curves: 0, segments: 0 };
  for (const { id } of ids) {
    counts.isolation += (
      await db
        .select({ n: count() })
        .from(isolationPoints)
        .where(eq(isolationPoints.analysisId, id))
    )[0]!.n;
    counts.curves += (
      await db
        .select({ n: count() })
        .from(orderCurvePoints)
        .where(eq(orderCurvePoints.analysisId, id))
    )[0]!.n;
    counts.segments += (
      await db
        .select({ n: count() })
        .from(analysisSegments)
        .where(eq(analysisSegments.analysisId, id))
    )[0]!.n;
  }
  return counts;
}

async function until<T>(read: () => Promise<T>, done: (v: T) => boolean, what: string): Promise<T> {
  for (let i = 0; i < 200; i++) {
    const v = await read();
    if (done(v)) return v;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}`);
}

const jobOf = async (logId: number) =>
  (await db.select().from(analysisJobs).where(eq(analysisJobs.driveLogId, logId)))[0]!;

describe("analysis jobs", () => {
  it("an error during the save leaves no partial rows; the job is queued again and then succeeds", async () => {
    const logId = await addLog(csv);
    let failures = 1;
    const runner = startJobRunner({
      db,
      pool: workers,
      blobRoot,
      pollMs: 50,
      beforeCommit: async () => {
        // Rows are written inside the transaction at this point; the throw must roll them back.
        if (failures-- > 0) throw new Error("injected: connection lost during save");
      },
    });
    try {
      const job = await until(
        () => jobOf(logId),
        (j) => j.status === "done",
        "the retried job",
      );
      expect(job.attempts).toBe(1);
      expect(job.lastError).toBeNull();
      const counts = await rowsFor(logId);
      expect(counts.analyses).toBe(1); // one version: the failed attempt left nothing
      expect(counts.isolation).toBeGreaterThan(0);
      expect(counts.curves).toBeGreaterThan(0);
      const [log] = await db.select().from(driveLogs).where(eq(driveLogs.id, logId));
      expect(log).toMatchObject({ status: "done", progress: 1 });
    } finally {
      await runner.stop();
    }
  });

  it(`gives up after ${MAX_ATTEMPTS} failed saves and says so on the drive log, with no analysis rows`, async () => {
    const logId = await addLog(csv.replace("0.00000,", "0.00000,") + "\n");
    const runner = startJobRunner({
      db,
      pool: workers,
      blobRoot,
      pollMs: 50,
      beforeCommit: async () => {
        throw new Error("injected: disk full");
      },
    });
    try {
      const log = await until(
        async () => (await db.select().from(driveLogs).where(eq(driveLogs.id, logId)))[0]!,
        (l) => l.status === "failed",
        "the failed log",
      );
      expect(log.error).toMatchObject({ code: "save_failed" });
      expect(log.error?.message).toContain("injected: disk full");
      expect((await jobOf(logId)).attempts).toBe(MAX_ATTEMPTS);
      expect(await rowsFor(logId)).toEqual({ analyses: 0, isolation: 0, curves: 0, segments: 0 });
    } finally {
      await runner.stop();
    }
  });

  it("a job left running by an instance that died is claimed again and finished", async () => {
    const logId = await addLog(csv + "\n\n");
    // The dead instance claimed it long ago and never beat again.
    const claimed = await claimJob(db, "dead-instance", new Date(Date.now() - 10 * STALE_AFTER_MS));
    expect(claimed?.driveLogId).toBe(logId);
    await db
      .update(analysisJobs)
      .set({ heartbeatAt: new Date(Date.now() - 2 * STALE_AFTER_MS) })
      .where(eq(analysisJobs.driveLogId, logId));
    expect((await jobOf(logId)).status).toBe("running");

    const runner = startJobRunner({ db, pool: workers, blobRoot, pollMs: 50 });
    try {
      const job = await until(
        () => jobOf(logId),
        (j) => j.status === "done",
        "the orphaned job",
      );
      expect(job.claimedBy).not.toBe("dead-instance");
      expect((await rowsFor(logId)).analyses).toBe(1);
    } finally {
      await runner.stop();
    }
  });

  it("a stopping instance hands its running job back to the queue at once", async () => {
    const logId = await addLog(csv + "\n\n\n\n\n");
    // A pool whose task only ends when aborted stands in for a long analysis.
    const endless = {
      options: { maxThreads: 1 },
      run: (_task: unknown, { signal }: { signal: AbortSignal }) =>
        new Promise((_, reject) =>
          signal.addEventListener("abort", () => reject(new Error("aborted"))),
        ),
    } as unknown as Parameters<typeof startJobRunner>[0]["pool"];
    const runner = startJobRunner({ db, pool: endless, blobRoot, pollMs: 50 });
    await until(
      () => jobOf(logId),
      (j) => j.status === "running",
      "the claim",
    );
    await runner.stop();
    const job = await jobOf(logId);
    expect(job).toMatchObject({ status: "queued", claimedBy: null, attempts: 0 });
    const [log] = await db.select().from(driveLogs).where(eq(driveLogs.id, logId));
    expect(log?.status).toBe("queued");
    // The next instance finishes it.
    const next = startJobRunner({ db, pool: workers, blobRoot, pollMs: 50 });
    try {
      await until(
        () => jobOf(logId),
        (j) => j.status === "done",
        "the handed-back job",
      );
    } finally {
      await next.stop();
    }
  });

  it("a fresh claim of a running job with a live heartbeat is refused (no double work)", async () => {
    const logId = await addLog(csv + "\n\n\n");
    const first = await claimJob(db, "instance-a");
    expect(first?.driveLogId).toBe(logId);
    expect(await claimJob(db, "instance-b")).toBeNull();
    await db.update(analysisJobs).set({ status: "done" }).where(eq(analysisJobs.driveLogId, logId));
  });

  it("a bad file ends as a failed drive log with the code, row and column, and writes no analysis rows", async () => {
    const logId = await addLog(
      "time [s],crank speed [rpm],gearbox input speed [rpm]\n0,800,800\n0.001,800,800\n0.0005,800,800\n",
    );
    const runner = startJobRunner({ db, pool: workers, blobRoot, pollMs: 50 });
    try {
      const log = await until(
        async () => (await db.select().from(driveLogs).where(eq(driveLogs.id, logId)))[0]!,
        (l) => l.status === "failed",
        "the failed log",
      );
      expect(log.error).toMatchObject({ code: "time_not_increasing", row: 4 });
      expect(await rowsFor(logId)).toEqual({ analyses: 0, isolation: 0, curves: 0, segments: 0 });
      // The raw file stays, so the drive log can be re-analysed after a fix.
      expect(await localBlobStore(blobRoot).has(log.blobKey)).toBe(true);
    } finally {
      await runner.stop();
    }
  });

  it("re-analysis with other settings adds a version and keeps the old one", async () => {
    const logId = await addLog(csv + "\n\n\n\n");
    const runner = startJobRunner({ db, pool: workers, blobRoot, pollMs: 50 });
    try {
      await until(
        () => jobOf(logId),
        (j) => j.status === "done",
        "the first analysis",
      );
      await queueAnalysis(await data.reanalysisJob(logId, { binRpm: 100, revsPerBlock: 16 }));
      await until(
        async () => (await rowsFor(logId)).analyses,
        (n) => n === 2,
        "the second version",
      );
      const versions = await db
        .select({ version: analyses.version, settings: analyses.settings })
        .from(analyses)
        .where(eq(analyses.driveLogId, logId))
        .orderBy(analyses.version);
      expect(versions.map((v) => v.version)).toEqual([1, 2]);
      expect(versions[0]!.settings).toMatchObject({ binRpm: 50, revsPerBlock: 8 });
      expect(versions[1]!.settings).toMatchObject({ binRpm: 100, revsPerBlock: 16 });
    } finally {
      await runner.stop();
    }
  });
});
