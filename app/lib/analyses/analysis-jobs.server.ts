/**
 * The analysis queue. A job row per analysis makes the work restartable: any app instance
 * claims queued jobs (SELECT … FOR UPDATE SKIP LOCKED), keeps a heartbeat while it runs them,
 * and a job whose heartbeat went stale (its instance died) is claimed again. The computation
 * runs in a piscina worker pool, never on the request thread (docs/architecture.md §5).
 */
import { and, eq, isNull, lt, or, sql } from "drizzle-orm";
import { randomBytes } from "node:crypto";
import { MessageChannel } from "node:worker_threads";
import { gzipSync } from "node:zlib";
import type { Piscina } from "piscina";
import {
  analyses,
  analysisJobs,
  analysisSegments,
  driveLogs,
  isolationPoints,
  orderCurvePoints,
} from "~/lib/infra/db/schema-drive-logs";
import type { AnalysisOptions, AnalysisResult } from "~/lib/signal";
import { chooseColumns } from "./column-choice.server";
import type { AppliedMapping, IngestMapping, LogError } from "../domain/drive-log-terms";
import type { Db } from "../infra/db.server";
import { localBlobStore } from "../infra/storage.server";
import type { AnalysisTask, AnalysisTaskOutcome } from "~/lib/analyses/analysis.worker";

/** The frozen inputs of one job: what the analysis ran with is always on record. */
export interface JobSettings {
  analysis: AnalysisOptions;
  /** Columns chosen by hand for this drive log: always used. */
  ingest: IngestMapping;
  /** The vehicle's remembered choice: used only where it fits the file (column-choice.server.ts). */
  remembered?: IngestMapping | null;
  /** What the run really used, written when it starts (shown on the drive-log page). */
  applied?: AppliedMapping;
}

/** A running job whose heartbeat is older than this is taken to be orphaned. */
export const STALE_AFTER_MS = 20_000;
const HEARTBEAT_MS = 5_000;
/** A job that failed to save this many times is given up (the drive log shows the error). */
export const MAX_ATTEMPTS = 3;

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** Queues an analysis of a drive log (inside the caller's transaction when given one). */
export async function enqueueAnalysis(
  db: Db | Tx,
  job: { teamId: number; driveLogId: number; settings: JobSettings },
): Promise<number> {
  await db
    .update(driveLogs)
    .set({ status: "queued", progress: 0, stage: null, error: null })
    .where(eq(driveLogs.id, job.driveLogId));
  const [row] = await db
    .insert(analysisJobs)
    .values({ teamId: job.teamId, driveLogId: job.driveLogId, settings: { ...job.settings } })
    .$returningId();
  return row!.id;
}

export interface ClaimedJob {
  id: number;
  teamId: number;
  driveLogId: number;
  settings: JobSettings;
  attempts: number;
  /** This claim's own mark in `claimed_by`: a later claim of the same job replaces it. */
  claimedBy: string;
}

/**
 * Claims the oldest queued (or orphaned) job, marking it with `claimedBy` (unique per claim), or
 * returns null.
 */
export async function claimJob(
  db: Db,
  claimedBy: string,
  now = new Date(),
): Promise<ClaimedJob | null> {
  const staleBefore = new Date(now.getTime() - STALE_AFTER_MS);
  return db.transaction(async (tx) => {
    const [job] = await tx
      .select({
        id: analysisJobs.id,
        teamId: analysisJobs.teamId,
        driveLogId: analysisJobs.driveLogId,
        settings: analysisJobs.settings,
        attempts: analysisJobs.attempts,
      })
      .from(analysisJobs)
      .where(
        or(
          eq(analysisJobs.status, "queued"),
          and(
            eq(analysisJobs.status, "running"),
            or(isNull(analysisJobs.heartbeatAt), lt(analysisJobs.heartbeatAt, staleBefore)),
          ),
        ),
      )
      .orderBy(analysisJobs.id)
      .limit(1)
      .for("update", { skipLocked: true });
    if (!job) return null;
    await tx
      .update(analysisJobs)
      .set({ status: "running", claimedBy, heartbeatAt: now })
      .where(eq(analysisJobs.id, job.id));
    await tx
      .update(driveLogs)
      .set({ status: "analysing", progress: 0, stage: "parse" })
      .where(eq(driveLogs.id, job.driveLogId));
    return { ...job, claimedBy, settings: job.settings as unknown as JobSettings };
  });
}

/** Test hook: called inside the save transaction after the rows are written, before commit. */
export type BeforeCommit = (tx: Tx) => Promise<void>;

/**
 * The job row, locked, if it is still this claim's: a job whose heartbeat went stale (e.g. the
 * database was away) may have been claimed again meanwhile, and only the latest claim may write.
 */
async function stillOurs(tx: Tx, job: ClaimedJob): Promise<boolean> {
  const [row] = await tx
    .select({ status: analysisJobs.status, claimedBy: analysisJobs.claimedBy })
    .from(analysisJobs)
    .where(eq(analysisJobs.id, job.id))
    .for("update");
  return row?.status === "running" && row.claimedBy === job.claimedBy;
}

/**
 * Saves a finished analysis in one transaction: all rows or none (docs/architecture.md §5).
 * Returns null, writing nothing, when the job was claimed again meanwhile (one version per run).
 */
export async function saveAnalysis(
  db: Db,
  job: ClaimedJob,
  result: AnalysisResult,
  beforeCommit?: BeforeCommit,
): Promise<number | null> {
  return db.transaction(async (tx) => {
    if (!(await stillOurs(tx, job))) return null;
    const [{ latest }] = (await tx
      .select({ latest: sql<number>`COALESCE(MAX(${analyses.version}), 0)`.mapWith(Number) })
      .from(analyses)
      .where(eq(analyses.driveLogId, job.driveLogId))) as [{ latest: number }];
    const measured = result.isolation.filter((p) => p.aboveNoise);
    const dBs = measured.map((p) => p.dB);
    const rpms = result.isolation.map((p) => p.rpm);
    const { orderMap, ...rest } = result;
    const [row] = await tx
      .insert(analyses)
      .values({
        teamId: job.teamId,
        driveLogId: job.driveLogId,
        version: latest + 1,
        settings: {
          ...result.settings,
          mapping: job.settings.applied?.mapping ?? job.settings.ingest,
          mappingSource: job.settings.applied?.source ?? "chosen",
        },
        firingOrder: result.firingOrder,
        isolationMinDb: dBs.length ? Math.min(...dBs) : null,
        isolationMaxDb: dBs.length ? Math.max(...dBs) : null,
        rpmMin: rpms.length ? Math.min(...rpms) : null,
        rpmMax: rpms.length ? Math.max(...rpms) : null,
        resonanceRpm: result.resonance?.rpm ?? null,
        resonanceDb: result.resonance?.isolationDb ?? null,
        rattleVerdict: result.idle?.verdict ?? null,
        idleAngAccelRadS2: result.idle?.gearboxAngAccelRadS2 ?? null,
        warnings: result.warnings,
        resultGz: gzipSync(JSON.stringify(rest)),
        orderMapGz: gzipSync(JSON.stringify(orderMap)),
      })
      .$returningId();
    const analysisId = row!.id;
    if (result.isolation.length) {
      await tx.insert(isolationPoints).values(result.isolation.map((p) => ({ analysisId, ...p })));
    }
    const curvePoints = result.orderCurves.flatMap((c) =>
      c.points.map((p) => ({ analysisId, order: c.order, ...p })),
    );
    for (let i = 0; i < curvePoints.length; i += 1000) {
      await tx.insert(orderCurvePoints).values(curvePoints.slice(i, i + 1000));
    }
    if (result.segments.length) {
      await tx
        .insert(analysisSegments)
        .values(result.segments.map((s, seq) => ({ analysisId, seq, ...s })));
    }
    await tx
      .update(driveLogs)
      .set({ status: "done", progress: 1, stage: null, error: null, latestAnalysisId: analysisId })
      .where(eq(driveLogs.id, job.driveLogId));
    await tx
      .update(analysisJobs)
      .set({ status: "done", finishedAt: new Date(), lastError: null })
      .where(eq(analysisJobs.id, job.id));
    await beforeCommit?.(tx);
    return analysisId;
  });
}

/** The drive log could not be analysed (bad file): it says why; no analysis rows are written. */
export async function failJob(db: Db, job: ClaimedJob, error: LogError): Promise<void> {
  await db.transaction(async (tx) => {
    if (!(await stillOurs(tx, job))) return;
    await tx
      .update(driveLogs)
      .set({ status: "failed", stage: null, error })
      .where(eq(driveLogs.id, job.driveLogId));
    await tx
      .update(analysisJobs)
      .set({
        status: "failed",
        finishedAt: new Date(),
        lastError: `${error.code}: ${error.message}`,
      })
      .where(eq(analysisJobs.id, job.id));
  });
}

/** Saving failed (e.g. the database went away mid-transaction): queue the job again, or give up. */
export async function retryJob(
  db: Db,
  job: ClaimedJob,
  reason: string,
): Promise<"queued" | "failed" | "superseded"> {
  const attempts = job.attempts + 1;
  if (attempts >= MAX_ATTEMPTS) {
    await db.update(analysisJobs).set({ attempts }).where(ours(job));
    await failJob(
      db,
      { ...job, attempts },
      {
        code: "save_failed",
        message: `the analysis could not be saved after ${attempts} attempts (${reason}); try re-analysing later`,
      },
    );
    return "failed";
  }
  const [requeued] = await db
    .update(analysisJobs)
    .set({ status: "queued", attempts, claimedBy: null, heartbeatAt: null, lastError: reason })
    .where(ours(job));
  // The save may have committed although its answer was lost, or another claim owns the job.
  if (requeued.affectedRows === 0) return "superseded";
  await db
    .update(driveLogs)
    .set({ status: "queued", progress: 0, stage: null })
    .where(eq(driveLogs.id, job.driveLogId));
  return "queued";
}

/** Hands a claimed job back to the queue unchanged (its instance is stopping). */
export async function releaseJob(db: Db, job: ClaimedJob): Promise<void> {
  const [released] = await db
    .update(analysisJobs)
    .set({ status: "queued", claimedBy: null, heartbeatAt: null })
    .where(ours(job));
  if (released.affectedRows === 0) return;
  await db
    .update(driveLogs)
    .set({ status: "queued", progress: 0, stage: null })
    .where(eq(driveLogs.id, job.driveLogId));
}

/** The job row while this claim holds it (running, with this claim's mark). */
const ours = (job: ClaimedJob) =>
  and(
    eq(analysisJobs.id, job.id),
    eq(analysisJobs.status, "running"),
    eq(analysisJobs.claimedBy, job.claimedBy),
  );

export interface RunnerOptions {
  db: Db;
  pool: Piscina;
  blobRoot: string;
  /** Jobs run at once by this instance (default: the pool's thread count). */
  concurrency?: number;
  pollMs?: number;
  beforeCommit?: BeforeCommit;
  onError?: (error: unknown) => void;
}

/** Claims and runs jobs until stopped. Several uploads queue; at most `concurrency` run. */
export function startJobRunner(options: RunnerOptions) {
  const instanceId = `${process.pid}-${randomBytes(4).toString("hex")}`;
  const concurrency = options.concurrency ?? options.pool.options.maxThreads;
  const pollMs = options.pollMs ?? 500;
  let running = 0;
  let claims = 0;
  let stopped = false;
  const active = new Set<Promise<void>>();
  const stopping = new AbortController();
  // A worker that dies before it is ready (e.g. a heap limit too small to load the pipeline)
  // is reported by piscina as a pool 'error', not on the task, which would wait forever: the
  // jobs still waiting for a worker (none has reported progress yet) fail with that error.
  const waiting = new Set<(error: unknown) => void>();
  const onPoolError = (error: unknown) => waiting.forEach((fail) => fail(error));
  options.pool.on?.("error", onPoolError);

  async function tick() {
    while (!stopped && running < concurrency) {
      // The slot is taken before the claim: ticks overlap (poll, poke), and each must see the
      // others' claims in flight, or more jobs than workers are claimed and wait in piscina's
      // own queue, where a worker's death would strand them.
      running++;
      const job = await claimJob(options.db, `${instanceId}#${++claims}`).catch((error) => {
        options.onError?.(error);
        return null;
      });
      if (!job) {
        running--;
        return;
      }
      const work = runClaimedJob(options, job, stopping.signal, waiting)
        .catch((error) => options.onError?.(error))
        .finally(() => {
          running--;
          active.delete(work);
        });
      active.add(work);
    }
  }
  const timer = setInterval(() => void tick(), pollMs);
  void tick();
  return {
    instanceId,
    /** Wakes the runner at once (after an upload), instead of at the next poll. */
    poke: () => void tick(),
    /** Stops claiming; running jobs are abandoned and handed back to the queue at once. */
    async stop() {
      stopped = true;
      clearInterval(timer);
      stopping.abort();
      await Promise.allSettled([...active]);
      options.pool.off?.("error", onPoolError);
    },
  };
}

async function runClaimedJob(
  options: RunnerOptions,
  claimed: ClaimedJob,
  signal: AbortSignal,
  waiting: Set<(error: unknown) => void>,
) {
  const { db } = options;
  const [log] = await db
    .select({ blobKey: driveLogs.blobKey, sizeBytes: driveLogs.sizeBytes })
    .from(driveLogs)
    .where(eq(driveLogs.id, claimed.driveLogId));
  if (!log) return; // deleted meanwhile; the job row went with it (cascade)

  const store = localBlobStore(options.blobRoot);
  const applied = await chooseColumns(claimed.settings.ingest, claimed.settings.remembered, () =>
    store.read(log.blobKey),
  );
  const job: ClaimedJob = { ...claimed, settings: { ...claimed.settings, applied } };
  await db
    .update(analysisJobs)
    .set({ settings: { ...job.settings } })
    .where(ours(job));

  // Until its worker reports progress the task may still wait for a worker: a pool 'error'
  // (a worker that died before it was ready) then fails it (startJobRunner).
  const poolFailed = new AbortController();
  const fail = (error: unknown) => poolFailed.abort(error);
  waiting.add(fail);
  const channel = new MessageChannel();
  let pending: { stage: string; progress: number } | null = null;
  channel.port2.on("message", (m: { stage: string; progress: number }) => {
    waiting.delete(fail);
    pending = m;
  });
  const beat = async () => {
    const [beaten] = await db
      .update(analysisJobs)
      .set({ heartbeatAt: new Date() })
      .where(ours(job));
    // A claim that lost the job (claimed again after its heartbeat went stale) stays quiet.
    if (pending && beaten.affectedRows > 0) {
      const { stage, progress } = pending;
      pending = null;
      await db.update(driveLogs).set({ stage, progress }).where(eq(driveLogs.id, job.driveLogId));
    }
  };
  const progressTimer = setInterval(() => void beat().catch(() => {}), 500);
  const heartbeat = setInterval(() => void beat().catch(() => {}), HEARTBEAT_MS);

  let outcome: AnalysisTaskOutcome;
  try {
    const task: AnalysisTask = {
      blobRoot: options.blobRoot,
      blobKey: log.blobKey,
      sizeBytes: log.sizeBytes,
      ingest: applied.mapping,
      analysis: job.settings.analysis,
      progress: channel.port1,
    };
    outcome = await options.pool.run(task, {
      transferList: [channel.port1],
      signal: AbortSignal.any([signal, poolFailed.signal]),
    });
  } catch (error) {
    if (signal.aborted) {
      // This instance is stopping: give the job back now rather than after the stale timeout.
      await releaseJob(db, job);
      return;
    }
    const cause = poolFailed.signal.aborted ? poolFailed.signal.reason : error;
    outcome = { ok: false, error: workerFailure(cause, options.pool), warnings: [] };
  } finally {
    waiting.delete(fail);
    clearInterval(progressTimer);
    clearInterval(heartbeat);
    channel.port2.close();
  }

  if (!outcome.ok) {
    await failJob(db, job, outcome.error);
    return;
  }
  try {
    await saveAnalysis(db, job, outcome.result, options.beforeCommit);
  } catch (error) {
    const reason = error instanceof Error ? error.message.split("\n")[0]! : String(error);
    await retryJob(db, job, reason);
  }
}

/**
 * What the drive log says when its worker died or threw instead of answering. Only this job
 * fails: piscina replaces a dead worker and the runner goes on with the next job.
 */
export function workerFailure(error: unknown, pool: Pick<Piscina, "options">): LogError {
  if ((error as NodeJS.ErrnoException | null)?.code === "ERR_WORKER_OUT_OF_MEMORY") {
    const limit = pool.options.resourceLimits?.maxOldGenerationSizeMb;
    return {
      code: "analysis_out_of_memory",
      message: `the analysis ran out of memory${limit ? ` (limit ${limit} MB per analysis)` : ""} and was stopped; split the file into shorter drive logs, or ask an admin to raise ANALYSIS_WORKER_MEMORY_MB`,
    };
  }
  const e = error instanceof Error ? error : new Error(String(error));
  return {
    code: "analysis_crashed",
    message: `the analysis stopped unexpectedly (${e.name}: ${e.message.split("\n")[0]}); please report this drive log`,
  };
}
