/**
 * Asking for an analysis from outside the runner: a re-analysis, a new column choice. The job
 * is queued and this process's runner woken at once. Uploads queue inside their own transaction
 * (enqueueAnalysis with its handle) and wake the runner after it commits
 * (app/lib/data/drive-log-intake.server.ts).
 */
import { db } from "../infra/db.server";
import { enqueueAnalysis, type NewJob } from "./queue.server";
import { wakeRunners } from "./runner.server";

export async function queueAnalysis(job: NewJob): Promise<number> {
  const id = await enqueueAnalysis(db, job);
  wakeRunners();
  return id;
}
