import { count, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analysisJobs, driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { auditEvents } from "~/lib/infra/db/schema";
import { analysisResultSchema } from "~/lib/signal";
import { createAnalysisPool } from "~/lib/infra/worker-pool.server";
import { analyticIdleCsv, expectedIsolationDb, IDLE_800 } from "../support/analytic-log";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// "Re-analyse all" (issue 17) through API v1 against the real MariaDB and the production server,
// then the job runner in this process with a pool of two workers. A database of its own: no
// other test file's runner may take these jobs.
const testbed = await useJobTestbed("reanalyse");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { db, pool } = await import("~/lib/infra/db.server");
const { createTestTeam } = await import("../support/accounts");
const { startJobRunner } = await import("~/lib/analyses/runner.server");
const { queueBatch } = await import("~/lib/data/reanalysis-batch.server");

let server: Awaited<ReturnType<typeof startServer>> | undefined;
const tokens: Record<string, string> = {};
let team: Awaited<ReturnType<typeof createTestTeam>>;
let vehicleId: number;
const logIds: number[] = [];

// Isolation known from the two-mass formula (tests/support/analytic-log.ts: Harris ch. 30 /
// Ogata 9-14); the 0.3 dB tolerance is drive-logs-api.test.ts's (issue 4).
const idle = { ...IDLE_800, durationS: 4 };

function api(path: string, token: string, init: RequestInit = {}) {
  return fetch(server!.url + path, {
    ...init,
    headers: { Authorization: `Bearer ${token}`, ...(init.headers ?? {}) },
  });
}

const post = (token: string, body: unknown, vehicle = vehicleId) =>
  api(`/api/v1/vehicles/${vehicle}/reanalyse`, token, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify(body),
  });

interface Progress {
  total: number;
  queued: number;
  running: number;
  done: number;
  failed: number;
  finished: boolean;
  logs: { driveLogId: number; state: string; analysisVersion: number | null }[];
}

/** Polls the batch until it has finished (a bounded number of reads, no time limit asserted). */
async function follow(batchId: string) {
  const seen: Progress[] = [];
  for (let i = 0; i < 600; i++) {
    const r = await api(`/api/v1/vehicles/${vehicleId}/reanalyse/${batchId}`, tokens.viewer!);
    expect(r.status).toBe(200);
    const p = (await r.json()) as Progress;
    seen.push(p);
    if (p.finished) return seen;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error(`batch ${batchId} did not finish`);
}

const jobCount = async () => (await db.select({ n: count() }).from(analysisJobs))[0]!.n;

async function settled(ids: number[]) {
  for (let i = 0; i < 600; i++) {
    const rows = await db.select().from(driveLogs).where(eq(driveLogs.vehicleId, vehicleId));
    const mine = rows.filter((r) => ids.includes(r.id));
    if (mine.every((r) => r.status === "done" || r.status === "failed")) return mine;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error("the drive logs did not finish");
}

beforeAll(async () => {
  let other: typeof team;
  [server, team, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam("Reanalyse"),
    createTestTeam("Elsewhere"),
  ]);
  for (const [key, t, role] of [
    ["engineer", team, "engineer"],
    ["admin", team, "admin"],
    ["technician", team, "technician"],
    ["viewer", team, "viewer"],
    ["other", other, "engineer"],
  ] as const) {
    const made = await createApiToken({
      userId: t.accounts[role].id,
      teamId: t.id,
      name: `reanalyse ${key}`,
      expiresAt: null,
    });
    tokens[key] = made.token;
  }
  const r = await api("/api/v1/vehicles", tokens.engineer!, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({ name: "Batch car", identifier: "RA-1", cylinders: 4, stroke: 4 }),
  });
  vehicleId = ((await r.json()) as { vehicle: { id: number } }).vehicle.id;
  // Three drive logs: two of damper variant A, one of B (different contents, one trailing line each).
  for (const [n, variant] of ["A", "A", "B"].entries()) {
    const form = new FormData();
    form.set("condition", "idle-neutral");
    form.set("damperVariant", variant);
    const csv = analyticIdleCsv(idle) + "\n".repeat(n);
    form.set("file", new Blob([csv], { type: "text/csv" }), `idle-${n}.csv`);
    const u = await api(`/api/v1/vehicles/${vehicleId}/logs`, tokens.technician!, {
      method: "POST",
      body: form,
    });
    expect(u.status).toBe(202);
    logIds.push(((await u.json()) as { log: { id: number } }).log.id);
  }
  const first = await settled(logIds);
  expect(first.map((l) => l.status)).toEqual(["done", "done", "done"]);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

describe("re-analyse all of a vehicle's drive logs", () => {
  it("an engineer queues every drive log; all end done with a new version carrying the new settings", async () => {
    const r = await post(tokens.engineer!, { revsPerBlock: 16, binRpm: 25 });
    expect(r.status).toBe(202);
    const batch = (await r.json()) as {
      batchId: string;
      jobs: { jobId: number; driveLogId: number }[];
    };
    expect(batch.batchId).toMatch(/^[0-9a-f]{16}$/);
    expect(batch.jobs.map((j) => j.driveLogId).sort()).toEqual([...logIds].sort());
    expect(r.headers.get("Location")).toBe(
      `/api/v1/vehicles/${vehicleId}/reanalyse/${batch.batchId}`,
    );

    const seen = await follow(batch.batchId);
    // Every answer's counts add up to the total, and the total is the batch's job count.
    for (const p of seen) {
      expect(p.queued + p.running + p.done + p.failed).toBe(p.total);
      expect(p.total).toBe(3);
      expect(p.logs.filter((l) => l.state === "done")).toHaveLength(p.done);
    }
    const last = seen.at(-1)!;
    expect(last).toMatchObject({ done: 3, failed: 0, queued: 0, running: 0, finished: true });
    expect(last.logs.map((l) => l.analysisVersion)).toEqual([2, 2, 2]);
    const audited = await db
      .select({ detail: auditEvents.detail })
      .from(auditEvents)
      .where(eq(auditEvents.action, "vehicle-reanalysed"));
    expect(audited.map((a) => a.detail)).toContain(
      `RA-1: 3 drive logs queued as batch ${batch.batchId} (revsPerBlock 16, binRpm 25)`,
    );

    for (const id of logIds) {
      const res = await api(`/api/v1/logs/${id}/result`, tokens.viewer!);
      const result = analysisResultSchema.parse(await res.json());
      expect(result.settings).toMatchObject({ revsPerBlock: 16, binRpm: 25 });
      const at800 = result.isolation.find((p) => Math.abs(p.rpm - 800) <= 12.5);
      expect(at800).toBeDefined();
      expect(Math.abs(at800!.dB - expectedIsolationDb(idle))).toBeLessThan(0.3);
    }
  });

  it("only the chosen damper variant's drive logs are queued", async () => {
    const r = await post(tokens.admin!, { damperVariant: "B" });
    expect(r.status).toBe(202);
    const batch = (await r.json()) as { batchId: string; jobs: { driveLogId: number }[] };
    expect(batch.jobs.map((j) => j.driveLogId)).toEqual([logIds[2]]);
    const last = (await follow(batch.batchId)).at(-1)!;
    expect(last).toMatchObject({ total: 1, done: 1 });
    expect(last.logs[0]!.analysisVersion).toBe(3);
  });

  it("technicians and viewers get 403, another team 404; the progress is not another team's", async () => {
    const before = await jobCount();
    expect((await post(tokens.technician!, {})).status).toBe(403);
    expect((await post(tokens.viewer!, {})).status).toBe(403);
    expect((await post(tokens.other!, {})).status).toBe(404);
    // An unknown token is 401; a write with neither token nor our own page's Origin is 403.
    const anonymous = await fetch(`${server!.url}/api/v1/vehicles/${vehicleId}/reanalyse`, {
      method: "POST",
      headers: { Authorization: "Bearer not-a-token" },
    });
    expect(anonymous.status).toBe(401);
    expect(await jobCount()).toBe(before);

    const r = await post(tokens.engineer!, { damperVariant: "A" });
    const { batchId } = (await r.json()) as { batchId: string };
    await follow(batchId);
    const path = `/api/v1/vehicles/${vehicleId}/reanalyse/${batchId}`;
    expect((await api(path, tokens.other!)).status).toBe(404);
    expect((await api(path.replace(batchId, "0123456789abcdef"), tokens.viewer!)).status).toBe(404);
  });

  it("a setting out of range is 400 naming the field, and nothing is queued", async () => {
    const before = await jobCount();
    const r = await post(tokens.engineer!, { revsPerBlock: 0, binRpm: 25 });
    expect(r.status).toBe(400);
    const { error } = (await r.json()) as { error: { code: string; message: string } };
    expect(error.code).toBe("invalid_settings");
    expect(error.message).toContain("revsPerBlock: At least 1 revolution per block.");
    const unknown = await post(tokens.engineer!, { blockLength: 4 });
    expect(unknown.status).toBe(400);
    expect(((await unknown.json()) as { error: { message: string } }).error.message).toContain(
      "blockLength",
    );
    const none = await post(tokens.engineer!, { damperVariant: "Z" });
    expect(none.status).toBe(409);
    expect(await jobCount()).toBe(before);
  });

  it("the runner runs as many jobs at once as the pool has workers, and no more", async () => {
    // The server's runner would take jobs too: from here on only this process's runner claims.
    await server!.stop();
    server = undefined;
    const workers = createAnalysisPool({ maxThreads: 2 });
    let inFlight = 0;
    let mostInFlight = 0;
    const run = workers.run.bind(workers);
    workers.run = (task, options) => {
      mostInFlight = Math.max(mostInFlight, ++inFlight);
      return run(task, options).finally(() => inFlight--);
    };
    // Queued before the runner starts, so it finds the whole batch waiting.
    const batch = await queueBatch({
      teamId: team.id,
      vehicleId,
      overrides: { binRpm: 50 },
      actor: { id: team.accounts.engineer.id, email: team.accounts.engineer.email },
      ip: "127.0.0.1",
    });
    let mostRunning = 0;
    let watching = true;
    const watcher = (async () => {
      while (watching) {
        const rows = await db
          .select({ status: analysisJobs.status })
          .from(analysisJobs)
          .where(eq(analysisJobs.batchId, batch.batchId));
        mostRunning = Math.max(mostRunning, rows.filter((r) => r.status === "running").length);
        await new Promise((resolve) => setTimeout(resolve, 5));
      }
    })();
    const runner = startJobRunner({ db, pool: workers, blobRoot: testbed.storage, pollMs: 50 });
    try {
      const logs = await settled(logIds);
      expect(logs.map((l) => l.status)).toEqual(["done", "done", "done"]);
    } finally {
      watching = false;
      await watcher;
      await runner.stop();
      await workers.destroy();
    }
    // Never more tasks in the pool than workers (a waiting one would be stranded by a worker's death).
    expect(mostInFlight).toBe(2);
    // Seen in the database too: at least two jobs 'running' at one moment (a third may be
    // claimed while a finished one still saves: a slot is freed when its worker answers).
    expect(mostRunning).toBeGreaterThanOrEqual(2);
  });
});
