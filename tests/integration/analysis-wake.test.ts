import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyses, analysisJobs, driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { useJobTestbed } from "../support/scratch-db";

// A database and storage of its own: no other server's runner may take these jobs.
const testbed = await useJobTestbed("wake");
const { startUploadBed } = await import("../support/upload-bed");
const { db, pool } = await import("~/lib/infra/db.server");

// A new upload wakes the job runner at once (app/lib/analyses/runner.server.ts, wakeRunners).
// The production server runs here with a poll of one hour (ANALYSIS_POLL_MS), so a drive log
// that gets analysed at all during the test was claimed because the upload woke the runner:
// the runner's only other claim is the one it makes when it starts, before any upload.

const HOUR_MS = 3_600_000;
let bed: Awaited<ReturnType<typeof startUploadBed>>;

beforeAll(async () => {
  bed = await startUploadBed(
    "Wake",
    { ...testbed.serverEnv, ANALYSIS_POLL_MS: String(HOUR_MS) },
    { name: "Wake car", identifier: "K-WAKE-1" },
  );
});
afterAll(async () => {
  await bed?.server.stop();
  await pool.end();
  await testbed.close();
});

async function upload(csv: string, name: string): Promise<number> {
  const r = await bed.upload(new Blob([csv], { type: "text/csv" }), name);
  expect(r.status).toBe(202);
  return ((await r.json()) as { log: { id: number } }).log.id;
}

const logRow = async (id: number) =>
  (await db.select().from(driveLogs).where(eq(driveLogs.id, id)))[0]!;

/** Reads the drive log until its analysis has ended (a bounded number of reads, no time limit asserted). */
async function settled(id: number) {
  for (let i = 0; i < 600; i++) {
    const row = await logRow(id);
    if (row.status === "done" || row.status === "failed") return row;
    await new Promise((r) => setTimeout(r, 100));
  }
  return logRow(id);
}

describe("a new upload starts its analysis at once", () => {
  it("is claimed by the wake, not by a poll, and finishes with its analysis row", async () => {
    // An analytic idle log (tests/support/analytic-log.ts); two contents, two drive logs.
    const csv = analyticIdleCsv({ ...IDLE_800, durationS: 2 });
    for (const [n, text] of [csv, csv + "\n"].entries()) {
      const before = new Date();
      const id = await upload(text, `wake-${n}.csv`);
      const log = await settled(id);
      expect(log.status).toBe("done");
      const [job] = await db.select().from(analysisJobs).where(eq(analysisJobs.driveLogId, id));
      expect(job?.status).toBe("done");
      // The claim's mark is "<instance>#<claim number>": claim 1 is the runner's start, made
      // before the first upload existed, so the first upload's job is taken by claim 2, the wake.
      if (n === 0) expect(job?.claimedBy).toMatch(/#2$/);
      // The job ran after the upload was sent (its heartbeat is written while it runs).
      expect(job!.heartbeatAt!.getTime()).toBeGreaterThanOrEqual(before.getTime());
      const rows = await db.select().from(analyses).where(eq(analyses.driveLogId, id));
      expect(rows.map((r) => r.id)).toEqual([log.latestAnalysisId]);
    }
  });
});
