/**
 * Issue 18, "Must show": through HAProxy, 20 drive logs are uploaded by 4 clients at once while
 * app instance 1 is killed (SIGKILL) and then Galera node 2 is killed and later rejoins. At the
 * end every log is `done` with exactly one analysis version, every raw file is in the bucket
 * under its SHA-256, nothing is orphaned, and each result equals a one-process run of the same
 * pipeline on the same file (tests/support/result-differences.ts: dB figures within 0.01 dB).
 *
 * The clients behave as a careful API client does: on a connection error or a 5xx answer they
 * first ask whether the upload landed (the drive-log list, by file name) and upload again only
 * if it did not — an answer lost with a dying instance must not make a second drive log.
 */
import { createHash } from "node:crypto";
import { createReadStream, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { writeBenchLog } from "../../bench/drive-log";
import type { JobSettings } from "~/lib/analyses/settings";
import { differences } from "../support/result-differences";
import { apiJson, clusterCommand, clusterTeam, sleep, uploadLog, web } from "./cluster";

const LOGS = 20;
const CLIENTS = 4;
const dir = mkdtempSync(join(tmpdir(), "twistlog-cluster-logs-"));
// Distinct logs of 12–31 s at 2.5 kHz (1–3 MB): start, idle and the first part of a run-up.
const files = Array.from({ length: LOGS }, (_, i) => {
  const path = join(dir, `drill-${String(i + 1).padStart(2, "0")}.csv`);
  writeBenchLog(path, { durationS: 12 + i, sampleRateHz: 2500, order: 2 });
  return path;
});
const sha256 = (path: string) => createHash("sha256").update(readFileSync(path)).digest("hex");

const { team, vehicleId, technician } = await clusterTeam("Drill");
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface LogRow {
  id: number;
  fileName: string;
  status: string;
}
const byName = new Map<string, number>();
const events: string[] = [];
const note = (line: string) => {
  events.push(`${new Date().toISOString().slice(11, 19)} ${line}`);
  process.stderr.write(`  drill: ${line}\n`);
};

async function listed(name: string): Promise<number | undefined> {
  try {
    const r = await apiJson<{ logs: LogRow[] }>(
      web,
      `/api/v1/vehicles/${vehicleId}/logs`,
      technician,
    );
    return r.status === 200 ? r.body.logs.find((l) => l.fileName === name)?.id : undefined;
  } catch {
    return undefined;
  }
}

async function uploadOnce(path: string): Promise<number> {
  const name = path.split("/").pop()!;
  for (let attempt = 1; ; attempt++) {
    if (attempt > 1) {
      const landed = await listed(name);
      if (landed) return landed;
    }
    try {
      const r = await uploadLog(
        web,
        { vehicleId, token: technician, condition: "run-up" },
        path,
        name,
      );
      if (r.status === 202) return r.body.log.id;
      if (r.status < 500)
        throw new Error(`upload of ${name} refused: ${r.status} ${JSON.stringify(r.body)}`);
      note(`${name}: attempt ${attempt} answered ${r.status}; asking and trying again`);
    } catch (error) {
      if ((error as Error).message.includes("refused")) throw error;
      note(
        `${name}: attempt ${attempt} failed (${(error as Error).message}); asking and trying again`,
      );
    }
    if (attempt >= 30) throw new Error(`upload of ${name} did not land in 30 attempts`);
    await sleep(1000);
  }
}

beforeAll(async () => {
  let accepted = 0;
  const faults = (async () => {
    while (accepted < 4) await sleep(100);
    note("killing app instance 1 (SIGKILL)");
    clusterCommand("kill-app", "1");
    while (accepted < 10) await sleep(100);
    note("killing Galera node 2 (SIGKILL)");
    clusterCommand("kill-node", "2");
    while (accepted < LOGS) await sleep(100);
    note("starting Galera node 2 again");
    clusterCommand("start-node", "2");
    note("Galera node 2 rejoined (Synced)");
  })();
  const queue = [...files];
  await Promise.all(
    Array.from({ length: CLIENTS }, async () => {
      for (let path = queue.shift(); path; path = queue.shift()) {
        byName.set(path.split("/").pop()!, await uploadOnce(path));
        accepted++;
      }
    }),
  );
  await faults;
  // Every analysis ends: a job of the killed instance is claimed again once its heartbeat is
  // stale (queue.server.ts STALE_AFTER_MS, 20 s).
  const deadline = Date.now() + 420_000;
  for (;;) {
    const r = await apiJson<{ logs: LogRow[] }>(
      web,
      `/api/v1/vehicles/${vehicleId}/logs`,
      technician,
    );
    const pending = r.body.logs.filter((l) => l.status !== "done" && l.status !== "failed");
    if (r.status === 200 && pending.length === 0) break;
    if (Date.now() > deadline)
      throw new Error(`still analysing: ${pending.map((l) => l.fileName)}`);
    await sleep(1000);
  }
  note("all analyses ended");
});

describe("20 uploads through HAProxy while an app instance and a Galera node die", () => {
  it("every drive log is done with exactly one analysis version", async () => {
    const { db } = await import("~/lib/infra/db.server");
    const { analyses, analysisJobs, driveLogs } = await import("~/lib/infra/db/schema-drive-logs");
    const { eq } = await import("drizzle-orm");
    const logs = await db.select().from(driveLogs).where(eq(driveLogs.vehicleId, vehicleId));
    expect(logs.map((l) => l.fileName).sort()).toEqual([...byName.keys()].sort());
    expect(logs.map((l) => l.status)).toEqual(logs.map(() => "done"));
    for (const log of logs) {
      const versions = await db.select().from(analyses).where(eq(analyses.driveLogId, log.id));
      expect(
        versions.map((a) => a.version),
        log.fileName,
      ).toEqual([1]);
      const jobs = await db.select().from(analysisJobs).where(eq(analysisJobs.driveLogId, log.id));
      expect(
        jobs.map((j) => j.status),
        log.fileName,
      ).toEqual(["done"]);
    }
  });

  it("every raw file is in the bucket under its SHA-256, and nothing is orphaned", async () => {
    const { db } = await import("~/lib/infra/db.server");
    const { driveLogs } = await import("~/lib/infra/db/schema-drive-logs");
    const { eq } = await import("drizzle-orm");
    const { blobStore } = await import("~/lib/infra/storage-settings.server");
    const { sweepStorage } = await import("~/lib/infra/storage-sweep.server");
    const store = blobStore();
    const logs = await db.select().from(driveLogs).where(eq(driveLogs.vehicleId, vehicleId));
    for (const log of logs) {
      const path = join(dir, log.fileName);
      // Reference: node:crypto's SHA-256 (FIPS 180-4) of the file on the client's disk.
      expect(log.blobKey, log.fileName).toBe(sha256(path));
      const hash = createHash("sha256");
      for await (const chunk of store.read(log.blobKey)) hash.update(chunk as Buffer);
      expect(hash.digest("hex"), `bucket copy of ${log.fileName}`).toBe(log.blobKey);
    }
    // Uploads cut off by the SIGKILL left parts behind; the sweep (which every instance runs
    // once the grace period has passed) takes them. Run it now, all uploads being answered.
    const swept = await sweepStorage({ store, db, graceMs: 1 });
    note(`sweep removed ${swept.files} unreferenced file(s) and ${swept.parts} abandoned part(s)`);
    const parts = [];
    for await (const p of store.list("parts")) parts.push(p.name);
    expect(parts).toEqual([]);
    const referenced = new Set(
      (await db.select({ key: driveLogs.blobKey }).from(driveLogs)).map((r) => r.key),
    );
    const stored = [];
    for await (const b of store.list("blobs")) stored.push(b.name);
    expect(stored.filter((k) => !referenced.has(k))).toEqual([]);
    for (const log of logs) expect(stored).toContain(log.blobKey);
  });

  it("no orphan rows: every job, analysis and log belongs to something that exists", async () => {
    const { pool } = await import("~/lib/infra/db.server");
    const orphans = async (sql: string) => ((await pool.query(sql))[0] as unknown[]).length;
    expect(
      await orphans(
        "SELECT j.id FROM analysis_jobs j LEFT JOIN drive_logs l ON l.id = j.drive_log_id WHERE l.id IS NULL",
      ),
    ).toBe(0);
    expect(
      await orphans(
        "SELECT a.id FROM analyses a LEFT JOIN drive_logs l ON l.id = a.drive_log_id WHERE l.id IS NULL",
      ),
    ).toBe(0);
    expect(
      await orphans(
        `SELECT l.id FROM drive_logs l LEFT JOIN analysis_jobs j ON j.drive_log_id = l.id WHERE l.vehicle_id = ${vehicleId} AND j.id IS NULL`,
      ),
    ).toBe(0);
  });

  it("each result equals a one-process run of the pipeline on the same file (0.01 dB)", async () => {
    const { analyseSource } = await import("~/lib/signal/pipeline");
    const { db } = await import("~/lib/infra/db.server");
    const { analysisJobs } = await import("~/lib/infra/db/schema-drive-logs");
    const { eq } = await import("drizzle-orm");
    for (const [name, logId] of byName) {
      const served = await apiJson<unknown>(web, `/api/v1/logs/${logId}/result`, technician);
      expect(served.status, name).toBe(200);
      const [job] = await db.select().from(analysisJobs).where(eq(analysisJobs.driveLogId, logId));
      const local = await analyseSource({
        source: createReadStream(join(dir, name)),
        ingest: {},
        analysis: (job!.settings as unknown as JobSettings).analysis,
      });
      if (!local.ok) throw new Error(`${name}: ${JSON.stringify(local.error)}`);
      expect(differences(served.body, local.value.result), name).toEqual([]);
    }
    process.stderr.write(`  drill timeline:\n${events.map((e) => `    ${e}`).join("\n")}\n`);
    expect(team.id).toBeGreaterThan(0);
  });
});
