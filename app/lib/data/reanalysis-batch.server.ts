/**
 * Re-analysing a whole vehicle at once (issue 17, "re-analyse all"): every drive log of the
 * vehicle — or only those of one damper variant — gets a job with the same new settings, all
 * queued in one transaction under one batch id (analysis_jobs.batch_id), and the runner of this
 * process is woken. The batch's progress is read back from its jobs. Each job is an ordinary
 * re-analysis: its save makes a new analysis version and supersedes the sign-offs that claim
 * the drive log (save.server.ts). Documented in README (API) and docs/architecture.md §5.
 */
import { randomBytes } from "node:crypto";
import { writeTransaction } from "../infra/db-errors.server";
import { and, asc, eq } from "drizzle-orm";
import { analyses, analysisJobs, driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { audit } from "./audit.server";
import { vehicleData, type AnalysisOverrides } from "./vehicles.server";
import type { JobState } from "../domain/drive-log-terms";
import { Conflict, NotFound } from "../domain/errors";
import { db } from "../infra/db.server";
import { enqueueBatch, type NewJob } from "../analyses/queue.server";
import { wakeRunners } from "../analyses/runner.server";

/** A batch id: 16 lower-case hex digits. */
export const BATCH_ID = /^[0-9a-f]{16}$/;

export interface BatchRequest {
  teamId: number;
  vehicleId: number;
  overrides: AnalysisOverrides;
  /** Only the drive logs of this damper variant; all of them when absent. */
  damperVariant?: string;
  actor: { id: number; email: string };
  ip: string;
}

export interface QueuedBatch {
  batchId: string;
  jobs: { jobId: number; driveLogId: number }[];
}

/**
 * Queues a new analysis of each chosen drive log. NotFound for another team's vehicle; Conflict
 * when there is no drive log to re-analyse, or when some are still queued or being analysed (a
 * second job would race the first: wait until they are done).
 */
export async function queueBatch(request: BatchRequest): Promise<QueuedBatch> {
  const data = vehicleData(request.teamId);
  const vehicle = await data.vehicle(request.vehicleId);
  const variant = request.damperVariant;
  const logs = (await data.logs(vehicle.id)).filter(
    (l) => variant === undefined || l.damperVariant === variant,
  );
  const of = variant === undefined ? "" : ` of damper variant “${variant}”`;
  if (logs.length === 0)
    throw new Conflict(
      `This vehicle has no drive logs${of} to re-analyse: upload some first, or choose another variant.`,
      "no_drive_logs",
    );
  const busy = logs.filter((l) => l.status === "queued" || l.status === "analysing");
  if (busy.length > 0)
    throw new Conflict(
      `${busy.length} of the drive logs${of} are still queued or being analysed; re-analyse all once they are done.`,
      "analysis_in_progress",
    );
  // Each log keeps its hand-chosen columns, and all read with the team's channel names as they
  // are now: the same settings a re-analysis of one drive log gets (vehicles.reanalysisJob).
  const jobs: NewJob[] = [];
  for (const l of logs.reverse()) jobs.push(await data.reanalysisJob(l.id, request.overrides));
  const batchId = randomBytes(8).toString("hex");
  await writeTransaction(db, (tx) => enqueueBatch(tx, batchId, jobs));
  wakeRunners();
  const queued = await db
    .select({ jobId: analysisJobs.id, driveLogId: analysisJobs.driveLogId })
    .from(analysisJobs)
    .where(and(eq(analysisJobs.batchId, batchId), eq(analysisJobs.teamId, request.teamId)))
    .orderBy(asc(analysisJobs.id));
  const settings = Object.entries(request.overrides)
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => `${k} ${v}`)
    .join(", ");
  await audit({
    teamId: request.teamId,
    actor: request.actor,
    action: "vehicle-reanalysed",
    detail: `${vehicle.identifier}: ${jobs.length} drive logs${of} queued as batch ${batchId} (${settings || "the vehicle's settings"})`,
    ip: request.ip,
  });
  return { batchId, jobs: queued };
}

export interface BatchLog {
  driveLogId: number;
  fileName: string;
  damperVariant: string | null;
  state: JobState;
  /** 0–1 while running; 1 when done. */
  progress: number;
  stage: string | null;
  /** Why it failed, in words (the drive log's own message). */
  error: string | null;
  /** The analysis version the job made, once done. */
  analysisVersion: number | null;
}

export interface BatchProgress {
  batchId: string;
  vehicleId: number;
  total: number;
  queued: number;
  running: number;
  done: number;
  failed: number;
  /** True when no job is queued or running. */
  finished: boolean;
  logs: BatchLog[];
}

/** The progress of a batch of the vehicle; NotFound for a batch that is not this vehicle's. */
export async function batchProgress(
  teamId: number,
  vehicleId: number,
  batchId: string,
): Promise<BatchProgress> {
  if (!BATCH_ID.test(batchId)) throw new NotFound("No such re-analysis of this vehicle.");
  const rows = await db
    .select({
      driveLogId: analysisJobs.driveLogId,
      state: analysisJobs.status,
      fileName: driveLogs.fileName,
      damperVariant: driveLogs.damperVariant,
      progress: driveLogs.progress,
      stage: driveLogs.stage,
      error: driveLogs.error,
      lastError: analysisJobs.lastError,
      analysisVersion: analyses.version,
    })
    .from(analysisJobs)
    .innerJoin(driveLogs, eq(driveLogs.id, analysisJobs.driveLogId))
    .leftJoin(analyses, eq(analyses.id, driveLogs.latestAnalysisId))
    .where(
      and(
        eq(analysisJobs.batchId, batchId),
        eq(analysisJobs.teamId, teamId),
        eq(driveLogs.vehicleId, vehicleId),
      ),
    )
    .orderBy(asc(analysisJobs.id));
  if (rows.length === 0) throw new NotFound("No such re-analysis of this vehicle.");
  const logs: BatchLog[] = rows.map((r) => ({
    driveLogId: r.driveLogId,
    fileName: r.fileName,
    damperVariant: r.damperVariant,
    state: r.state,
    progress: r.state === "done" ? 1 : r.state === "running" ? r.progress : 0,
    stage: r.state === "running" ? r.stage : null,
    error: r.state === "failed" ? (r.error?.message ?? r.lastError ?? "the analysis failed") : null,
    analysisVersion: r.state === "done" ? r.analysisVersion : null,
  }));
  const count = (state: JobState) => logs.filter((l) => l.state === state).length;
  const progress = {
    total: logs.length,
    queued: count("queued"),
    running: count("running"),
    done: count("done"),
    failed: count("failed"),
  };
  return {
    batchId,
    vehicleId,
    ...progress,
    finished: progress.queued + progress.running === 0,
    logs,
  };
}
