import { inArray } from "drizzle-orm";
import { driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { signoffResults, signoffs } from "~/lib/infra/db/schema-signoffs";
import { describeDbError, databaseUnavailable } from "./db-errors.server";
import type { Db } from "./db.server";
import { getEnv } from "./env.server";
import { formatBytes, type BlobStore } from "./storage.server";

/**
 * The storage sweep: removes stored files that no drive log or sign-off references and parts of uploads
 * that were abandoned, each only once untouched for a grace period.
 *
 * Why the grace period makes it safe while uploads run, on any number of app instances:
 * an upload writes its part (modified with every chunk), then the stored file, then its drive
 * log a moment later; a put of content already stored marks that file modified again. So a
 * file or part untouched for the whole grace period (default 1 h) belongs to no upload in
 * flight. The sweep lists first, asks the database second, and checks the modified time again
 * just before each delete. Two instances sweeping at once delete the same files twice, which
 * is harmless. The storage folder must belong to one database: a file referenced only by
 * another database's drive logs looks unreferenced here.
 */
export interface SweepReport {
  files: number;
  fileBytes: number;
  parts: number;
  partBytes: number;
}

/** Keys checked against drive_logs per query. */
const BATCH = 500;

export async function sweepStorage(options: {
  store: BlobStore;
  db: Db;
  graceMs: number;
  now?: Date;
}): Promise<SweepReport> {
  const { store, db } = options;
  const cutoff = new Date((options.now ?? new Date()).getTime() - options.graceMs);
  const report: SweepReport = { files: 0, fileBytes: 0, parts: 0, partBytes: 0 };

  // Parts need no database: an old one was abandoned by a request that is gone.
  for await (const part of store.list("parts")) {
    if (part.modifiedAt > cutoff) continue;
    if (await store.removePart(part.name, { ifNotModifiedAfter: cutoff })) {
      report.parts++;
      report.partBytes += part.bytes;
    }
  }

  let batch: { name: string; bytes: number }[] = [];
  const sweepBatch = async () => {
    const names = batch.map((b) => b.name);
    // Drive logs reference their raw files; a sign-off keeps its drive logs' raw files and its
    // report (issue 16), even when a drive log itself was deleted.
    const [logs, kept, reports] = await Promise.all([
      db
        .selectDistinct({ key: driveLogs.blobKey })
        .from(driveLogs)
        .where(inArray(driveLogs.blobKey, names)),
      db
        .selectDistinct({ key: signoffResults.blobKey })
        .from(signoffResults)
        .where(inArray(signoffResults.blobKey, names)),
      db
        .selectDistinct({ key: signoffs.reportSha256 })
        .from(signoffs)
        .where(inArray(signoffs.reportSha256, names)),
    ]);
    const referenced = new Set([...logs, ...kept, ...reports].map((r) => r.key));
    for (const file of batch) {
      if (referenced.has(file.name)) continue;
      if (await store.remove(file.name, { ifNotModifiedAfter: cutoff })) {
        report.files++;
        report.fileBytes += file.bytes;
      }
    }
    batch = [];
  };
  for await (const file of store.list("blobs")) {
    if (file.modifiedAt > cutoff) continue;
    batch.push(file);
    if (batch.length >= BATCH) await sweepBatch();
  }
  if (batch.length) await sweepBatch();
  return report;
}

/** The one log line of a sweep that removed something (counts and sizes, never names). */
export function sweepLine(report: SweepReport, graceMs: number): string {
  const files = `${report.files} unreferenced stored ${report.files === 1 ? "file" : "files"} (${formatBytes(report.fileBytes)})`;
  const parts = `${report.parts} abandoned upload ${report.parts === 1 ? "part" : "parts"} (${formatBytes(report.partBytes)})`;
  return `storage sweep: removed ${files} and ${parts} untouched for ${formatGrace(graceMs)}`;
}

function formatGrace(ms: number): string {
  const s = Math.round(ms / 1000);
  if (s % 3600 === 0) return `${s / 3600} h`;
  if (s % 60 === 0) return `${s / 60} min`;
  return `${s} s`;
}

/**
 * Runs the sweep every half grace period (at most every 15 min, at least every second) in
 * this app instance; the analysis service starts it. A grace period of 0 turns it off.
 */
export function startStorageSweep(options: { store: BlobStore; db: Db; graceMs: number }) {
  const { graceMs } = options;
  if (graceMs <= 0) return { stop: async () => {} };
  const intervalMs = Math.min(15 * 60_000, Math.max(1000, graceMs / 2));
  let running: Promise<void> | null = null;
  const run = async () => {
    try {
      const report = await sweepStorage(options);
      if (report.files + report.parts > 0) console.log(sweepLine(report, graceMs));
    } catch (error) {
      // Nothing is removed without asking the database; the next round tries again.
      const why = databaseUnavailable(error)
        ? describeDbError(error, getEnv())
        : (error as Error).message?.split("\n")[0];
      console.error(`storage sweep stopped early: ${why}`);
    }
  };
  const timer = setInterval(() => {
    running ??= run().finally(() => (running = null));
  }, intervalMs);
  timer.unref();
  return {
    async stop() {
      clearInterval(timer);
      await running;
    },
  };
}
