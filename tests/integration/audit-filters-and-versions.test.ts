import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, expectedIsolationDb, IDLE_800 } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// Issue 11 §3.11 over HTTP: the audit log's GET filters, and an earlier analysis version of a
// drive log opened read-only at ?analysis=<id>. A database of its own, because the test
// re-analyses a drive log and other files' job runners must not take the job.
const testbed = await useJobTestbed("audit_versions");
const { db, pool } = await import("~/lib/infra/db.server");
const { auditEvents } = await import("~/lib/infra/db/schema");
const { audit } = await import("~/lib/data/audit.server");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;

let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
let other: TestTeam;

beforeAll(async () => {
  [server, team, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam("Audit"),
    createTestTeam("Elsewhere"),
  ]);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

async function as(t: TestTeam, role: "admin" | "engineer" | "technician") {
  return HttpClient.signedIn(server.url, t.accounts[role].email, TEST_PASSWORD);
}

/** The action codes of the rows the audit page lists, in order. */
const rowsOf = (html: string) =>
  [...html.matchAll(/data-audit-action="([^"]+)"/g)].map((m) => m[1]);
/** The e-mail in the "Who" cell of each row. */
const whoOf = (html: string) =>
  [...html.matchAll(/<tr data-audit-action="[^"]+"><td[^>]*>.*?<\/td><td[^>]*>([^<]*)<\/td>/g)].map(
    (m) => m[1],
  );

describe("the audit log's filters", () => {
  it("narrows the entries by action, by person and by a day range; empty and invalid filters say so", async () => {
    const admin = await as(team, "admin"); // a sign-in of the admin
    await as(team, "engineer"); // a sign-in of the engineer
    const ip = "127.0.0.1";
    const engineer = { id: team.accounts.engineer.id, email: team.accounts.engineer.email };
    await audit({ teamId: team.id, actor: engineer, action: "vehicle-created", detail: "V1", ip });
    await audit({ teamId: team.id, actor: engineer, action: "vehicle-created", detail: "V2", ip });
    const adminActor = { id: team.accounts.admin.id, email: team.accounts.admin.email };
    await audit({
      teamId: team.id,
      actor: adminActor,
      action: "vehicle-changed",
      detail: "V1",
      ip,
    });
    // Another team's entry of the same kind never shows.
    const stranger = { id: other.accounts.engineer.id, email: other.accounts.engineer.email };
    await audit({ teamId: other.id, actor: stranger, action: "vehicle-created", detail: "X", ip });
    // Two entries on known days, for the date range (UTC days, as the page shows its times).
    await db.insert(auditEvents).values([
      {
        teamId: team.id,
        actorUserId: adminActor.id,
        actorEmail: adminActor.email,
        action: "token-created",
        detail: "january 10",
        ip,
        createdAt: new Date("2026-01-10T23:30:00Z"),
      },
      {
        teamId: team.id,
        actorUserId: adminActor.id,
        actorEmail: adminActor.email,
        action: "token-created",
        detail: "january 11",
        ip,
        createdAt: new Date("2026-01-11T00:30:00Z"),
      },
    ]);

    const all = await admin.get("/team/audit");
    expect(all.status).toBe(200);
    expect(rowsOf(all.html)).toContain("sign-in");
    expect(all.html).not.toContain(stranger.email);
    // The filters offer the people and actions in this team's log, and nothing else.
    expect(all.html).toContain(`<option value="${engineer.email}">`);
    expect(all.html).not.toContain(`<option value="${stranger.email}">`);
    expect(all.html).toContain('<option value="vehicle-changed">');
    expect(all.html).not.toContain('<option value="share-emailed">');

    const created = await admin.get("/team/audit?action=vehicle-created");
    expect(rowsOf(created.html)).toEqual(["vehicle-created", "vehicle-created"]);
    expect(whoOf(created.html)).toEqual([engineer.email, engineer.email]);
    // The form shows the filter it applied, and a way back to everything.
    expect(created.html).toMatch(/<option value="vehicle-created" selected="">/);
    expect(created.html).toContain('href="/team/audit"');

    const byEngineer = await admin.get(`/team/audit?person=${encodeURIComponent(engineer.email)}`);
    expect(new Set(whoOf(byEngineer.html))).toEqual(new Set([engineer.email]));
    expect(rowsOf(byEngineer.html).sort()).toEqual([
      "sign-in",
      "vehicle-created",
      "vehicle-created",
    ]);

    const both = await admin.get(
      `/team/audit?action=vehicle-created&person=${encodeURIComponent(adminActor.email)}`,
    );
    expect(rowsOf(both.html)).toEqual([]);
    expect(both.html).toContain("No entries match these filters.");
    expect(both.html).toContain("Clear the filters");

    // "to" includes its whole day; "from" starts at midnight UTC. Empty fields mean "any".
    const day10 = await admin.get("/team/audit?action=&person=&from=2026-01-10&to=2026-01-10");
    expect(day10.status).toBe(200);
    expect(rowsOf(day10.html)).toEqual(["token-created"]);
    expect(day10.html).toContain("january 10");
    const fromDay11 = await admin.get("/team/audit?action=token-created&from=2026-01-11");
    expect(fromDay11.html).toContain("january 11");
    expect(fromDay11.html).not.toContain("january 10");

    // Invalid filters: 400 with the reason beside the field, and no entries.
    const bogus = await admin.get("/team/audit?action=no-such-action");
    expect(bogus.status).toBe(400);
    expect(bogus.html).toContain("Choose an action from the list.");
    expect(rowsOf(bogus.html)).toEqual([]);
    const backwards = await admin.get("/team/audit?from=2026-02-01&to=2026-01-01");
    expect(backwards.status).toBe(400);
    expect(backwards.html).toContain("The end date is before the start date.");
    const notADate = await admin.get("/team/audit?from=01.02.2026");
    expect(notADate.status).toBe(400);
    expect(notADate.html).toContain("Use a date like 2026-11-04.");
  });

  it("stays an admin page: an engineer's filtered request is 403", async () => {
    const engineer = await as(team, "engineer");
    expect((await engineer.get("/team/audit?action=sign-in")).status).toBe(403);
  });
});

/** The vehicle page's plain upload (HttpClient.uploadDriveLog); resolves with the new log's id. */
function upload(client: HttpClient, vehicleId: number, name: string, content: string) {
  return client.uploadDriveLog(vehicleId, name, content);
}

async function waitUntilDone(client: HttpClient, vehicleId: number, logId: number) {
  for (let i = 0; i < 240; i++) {
    const { logs } = JSON.parse((await client.get(`/vehicles/${vehicleId}/status`)).html) as {
      logs: { id: number; status: string }[];
    };
    const status = logs.find((l) => l.id === logId)?.status;
    if (status === "done") return;
    expect(status).not.toBe("failed");
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`drive log ${logId} did not finish`);
}

interface ChartsJson {
  logId: number;
  analysis: { id: number; version: number };
  charts: { isolation: { rpm: number[]; dB: number[] } };
}

describe("an earlier analysis version", () => {
  it("opens read-only with its own figures and a note naming it, beside the latest that stays the default", async () => {
    const data = vehicleData(team.id);
    const vehicleId = await data.create(
      vehicleSchema.parse({ name: "Version car", identifier: "VER-1", cylinders: 4, stroke: 4 }),
    );
    const engineer = await as(team, "engineer");
    await engineer.get(`/vehicles/${vehicleId}`);
    const logId = await upload(engineer, vehicleId, "versions.csv", analyticIdleCsv(IDLE_800));
    await waitUntilDone(engineer, vehicleId, logId);
    const path = `/vehicles/${vehicleId}/logs/${logId}`;
    await engineer.get(path);
    expect((await engineer.post(path, { intent: "reanalyse", revsPerBlock: "16" })).status).toBe(
      200,
    );
    await waitUntilDone(engineer, vehicleId, logId);
    const [v2, v1] = await data.versions(logId);
    expect([v1!.version, v2!.version]).toEqual([1, 2]);

    // The plain URL is the latest, as before.
    const latest = await engineer.get(path);
    expect(latest.html).toContain("Analysis version 2");
    expect(latest.html).not.toContain("An earlier analysis, read only.");
    expect(latest.html).toContain(`href="${path}?analysis=${v1!.id}"`);

    const older = await engineer.get(`${path}?analysis=${v1!.id}`);
    expect(older.status).toBe(200);
    expect(older.html).toContain("Analysis version 1");
    expect(older.html).toContain("An earlier analysis, read only.");
    expect(older.html).toContain("You are looking at version 1 of 2, made ");
    expect(older.html).toContain("with firing order 2, 8 revolutions per block, ");
    // The way back: a link to the plain URL, which is the latest.
    expect(older.html).toMatch(
      new RegExp(`<a [^>]*href="${path}"[^>]*>See the latest analysis \\(version 2\\)</a>`),
    );
    // Its own settings in the figures: 8 revolutions per block, so an order resolution of 1/8
    // (a DFT over T revolutions resolves 1/T orders: common practice), where the latest has 16.
    expect(older.html).toMatch(/8 \(order resolution 0\.125\)/);
    expect(latest.html).toMatch(/16 \(order resolution 0\.063\)/);
    // Read only: nothing that would act on the latest from this page.
    expect(older.html).not.toContain("Re-analyse with other settings");
    expect(older.html).not.toContain("Result CSV");

    // Its chart JSON: version 1's own numbers. Isolation at 800 rpm against −20·log10|H(r)| of
    // the base-excited two-mass system (Harris' Shock and Vibration Handbook ch. 30; Ogata,
    // System Dynamics, eq. 9-14), 0.3 dB as in the other pipeline tests.
    const json = await engineer.get(`${path}/charts.json?analysis=${v1!.id}`);
    expect(json.status).toBe(200);
    const body = JSON.parse(json.html) as ChartsJson;
    expect(body.analysis).toMatchObject({ id: v1!.id, version: 1 });
    const i = body.charts.isolation.rpm.findIndex((rpm) => Math.abs(rpm - 800) <= 25);
    expect(i).toBeGreaterThanOrEqual(0);
    expect(Math.abs(body.charts.isolation.dB[i]! - expectedIsolationDb(IDLE_800))).toBeLessThan(
      0.3,
    );
    const plain = JSON.parse((await engineer.get(`${path}/charts.json`)).html) as ChartsJson;
    expect(plain.analysis).toMatchObject({ id: v2!.id, version: 2 });

    // Not an id, or an analysis of another drive log: 404 on the page and the JSON.
    const otherLog = await upload(
      engineer,
      vehicleId,
      "other.csv",
      analyticIdleCsv({ ...IDLE_800, durationS: 6 }),
    );
    await waitUntilDone(engineer, vehicleId, otherLog);
    const [foreign] = await data.versions(otherLog);
    for (const q of ["abc", "1e3", String(foreign!.id)]) {
      expect([q, (await engineer.get(`${path}?analysis=${q}`)).status]).toEqual([q, 404]);
      expect([q, (await engineer.get(`${path}/charts.json?analysis=${q}`)).status]).toEqual([
        q,
        404,
      ]);
    }
    // Another team's member gets 404 for the log, whatever the version.
    const stranger = await as(other, "engineer");
    expect((await stranger.get(`${path}?analysis=${v1!.id}`)).status).toBe(404);
  });
});
