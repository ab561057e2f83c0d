import { startJobRunner } from "./runner.server";
import type { BeforeCommit } from "./save.server";
import { describeDbError } from "../infra/db-errors.server";
import { db } from "../infra/db.server";
import { getEnv } from "../infra/env.server";
import { startStorageSweep } from "../infra/storage-sweep.server";
import { blobStore, blobStoreDescription, sweepGraceMs } from "../infra/storage-settings.server";
import { createAnalysisPool } from "../infra/worker-pool.server";

/**
 * The background analysis of this app instance: a worker pool and a job runner that claims
 * queued analyses from the database. server/index.ts starts it with the HTTP server and stops
 * it on shutdown; a job cut short by a stop is claimed again once its heartbeat is stale.
 */
export function startAnalysisService(options: { beforeCommit?: BeforeCommit } = {}) {
  const pool = createAnalysisPool({ warm: true });
  // Only a worker that died before it was ready gets here (a task's own failure goes to its job).
  pool.on("error", (error: Error) =>
    console.error(`analysis worker could not start: ${error.name}: ${error.message}`),
  );
  let lastMessage = "";
  let lastAt = 0;
  const runner = startJobRunner({
    db,
    pool,
    store: blobStoreDescription(),
    pollMs: getEnv().ANALYSIS_POLL_MS,
    beforeCommit: options.beforeCommit,
    onTimings:
      getEnv().ANALYSIS_TIMINGS === "1"
        ? (t) => console.log(`analysis timings: ${JSON.stringify(t)}`)
        : undefined,
    onError(error) {
      // One line, and the same line at most once a minute (a stopped database must not flood the log).
      // Drizzle wraps the driver's error (with the SQL): the cause says what happened.
      const cause = (error as { cause?: { code?: string } } | null)?.cause;
      const message = `analysis queue: ${describeDbError(cause?.code ? cause : error, getEnv())}`;
      if (message !== lastMessage || Date.now() - lastAt > 60_000) console.error(message);
      lastMessage = message;
      lastAt = Date.now();
    },
  });
  // The storage sweep runs beside the queue (app/lib/infra/storage-sweep.server.ts).
  const sweep = startStorageSweep({ store: blobStore(), db, graceMs: sweepGraceMs() });
  return {
    async stop() {
      await Promise.all([runner.stop(), sweep.stop()]);
      await pool.destroy();
    },
  };
}
