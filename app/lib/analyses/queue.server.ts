/**
 * The analysis queue in the database. A job row per analysis makes the work restartable: any
 * app instance claims queued jobs (SELECT … FOR UPDATE SKIP LOCKED), keeps a heartbeat while it
 * runs them, and a job whose heartbeat went stale (its instance died) is claimed again. Only the
 * latest claim of a job may write its outcome (`ours`, `stillOurs`).
 */
import { and, eq, inArray, isNull, lt, or } from "drizzle-orm";
import { writeTransaction, type Tx } from "../infra/db-errors.server";
import { analysisJobs, driveLogs } from "~/lib/infra/db/schema-drive-logs";
import type { LogError } from "../domain/drive-log-terms";
import type { Db } from "../infra/db.server";
import type { JobSettings } from "./settings";

/** A running job whose heartbeat is older than this is taken to be orphaned. */
export const STALE_AFTER_MS = 20_000;
export const HEARTBEAT_MS = 5_000;
/** A job that failed to save this many times is given up (the drive log shows the error). */
export const MAX_ATTEMPTS = 3;

/** A transaction handle, for writes that must commit together with the caller's. */
export type { Tx } from "../infra/db-errors.server";

/** What a new job needs: the drive log and the settings it is to be analysed with. */
export interface NewJob {
  teamId: number;
  driveLogId: number;
  settings: JobSettings;
}

/**
 * Queues an analysis of a drive log (inside the caller's transaction when given one). The
 * runner does not see it before the caller wakes it (runner.server.ts) or its next poll.
 */
export async function enqueueAnalysis(db: Db | Tx, job: NewJob): Promise<number> {
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

/**
 * Queues the jobs of a batch (a whole vehicle re-analysed, data/reanalysis-batch.server.ts) in the caller's
 * transaction: their drive logs queued in one statement, the jobs inserted in another.
 */
export async function enqueueBatch(tx: Tx, batchId: string, jobs: NewJob[]): Promise<void> {
  if (jobs.length === 0) return;
  await tx
    .update(driveLogs)
    .set({ status: "queued", progress: 0, stage: null, error: null })
    .where(
      inArray(
        driveLogs.id,
        jobs.map((j) => j.driveLogId),
      ),
    );
  await tx.insert(analysisJobs).values(
    jobs.map((j) => ({
      teamId: j.teamId,
      driveLogId: j.driveLogId,
      settings: { ...j.settings },
      batchId,
    })),
  );
}

export interface ClaimedJob {
  id: number;
  teamId: number;
  driveLogId: number;
  settings: JobSettings;
  attempts: number;
  /** When the job was queued. */
  queuedAt: Date;
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
  return writeTransaction(db, async (tx) => {
    const [job] = await tx
      .select({
        id: analysisJobs.id,
        teamId: analysisJobs.teamId,
        driveLogId: analysisJobs.driveLogId,
        settings: analysisJobs.settings,
        attempts: analysisJobs.attempts,
        queuedAt: analysisJobs.createdAt,
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

/** The job row while this claim holds it (running, with this claim's mark). */
export const ours = (job: ClaimedJob) =>
  and(
    eq(analysisJobs.id, job.id),
    eq(analysisJobs.status, "running"),
    eq(analysisJobs.claimedBy, job.claimedBy),
  );

/**
 * The job row, locked, if it is still this claim's: a job whose heartbeat went stale (e.g. the
 * database was away) may have been claimed again meanwhile, and only the latest claim may write.
 */
export async function stillOurs(tx: Tx, job: ClaimedJob): Promise<boolean> {
  const [row] = await tx
    .select({ status: analysisJobs.status, claimedBy: analysisJobs.claimedBy })
    .from(analysisJobs)
    .where(eq(analysisJobs.id, job.id))
    .for("update");
  return row?.status === "running" && row.claimedBy === job.claimedBy;
}

/** Records the columns the run really uses (chosen when it starts) on the job row. */
export async function recordSettings(db: Db, job: ClaimedJob): Promise<void> {
  await db
    .update(analysisJobs)
    .set({ settings: { ...job.settings } })
    .where(ours(job));
}

/**
 * Beats the job's heartbeat, then writes the progress `takeProgress` hands over (if any) to its
 * drive log. A claim that lost the job (claimed again after its heartbeat went stale) writes
 * nothing more and keeps its progress.
 */
export async function beat(
  db: Db,
  job: ClaimedJob,
  takeProgress: () => { stage: string; progress: number } | null,
): Promise<void> {
  const [beaten] = await db.update(analysisJobs).set({ heartbeatAt: new Date() }).where(ours(job));
  if (beaten.affectedRows === 0) return;
  const pending = takeProgress();
  if (pending) {
    const { stage, progress } = pending;
    await db.update(driveLogs).set({ stage, progress }).where(eq(driveLogs.id, job.driveLogId));
  }
}

/** The drive log could not be analysed (bad file): it says why; no analysis rows are written. */
export async function failJob(db: Db, job: ClaimedJob, error: LogError): Promise<void> {
  await writeTransaction(db, async (tx) => {
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
