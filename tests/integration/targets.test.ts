import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, expectedIsolationDb, IDLE_800 } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// Targets on the vehicle page over HTTP, as a browser without JavaScript uses them (forms posted
// to the page's action with an intent), against the real MariaDB and the production server. A
// database of its own: other test files' job runners must not take this file's analyses.
const testbed = await useJobTestbed("targets");
const { db, pool } = await import("~/lib/infra/db.server");
const { auditEvents } = await import("~/lib/infra/db/schema");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { targetData } = await import("~/lib/data/targets.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;

let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
let other: TestTeam;
let vehicleId: number;
let path: string;

// The analytic idle log: order 2 at 800 rpm, 10 rpm on the crank, through a base-excited two-mass
// system with fn = 12 Hz, ζ = 0.1 (tests/support/analytic-log.ts). Its isolation is
// −20·log10|H(r)| (Harris' Shock and Vibration Handbook ch. 30; Ogata, System Dynamics, eq. 9-14),
// 11.2 dB here; the pipeline meets it within 0.3 dB (the tolerance of the API and page tests).
const idle = IDLE_800;
const expectedDb = expectedIsolationDb(idle);
// Gearbox-input angular acceleration α = Δω·q·Ω (docs/references.md [computed]) with the gearbox
// amplitude Δω = crank amplitude / 10^(isolation/20); the pipeline meets it within 5 % (the
// tolerance of the signal tests). For a pure tone the time-domain peak is the same figure.
const rpmToRadS = (2 * Math.PI) / 60;
const expectedAlpha =
  idle.crankAmpRpm * rpmToRadS * 10 ** (-expectedDb / 20) * idle.order * idle.rpm * rpmToRadS;

const met = Math.round((expectedDb - 1) * 100) / 100; // 1 dB under the analytic isolation
const strict = Math.round((expectedDb + 1) * 100) / 100; // 1 dB over it

beforeAll(async () => {
  [server, team, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam("Targets"),
    createTestTeam("Elsewhere"),
  ]);
  const data = vehicleData(team.id);
  vehicleId = await data.create(
    vehicleSchema.parse({ name: "Target car", identifier: "TGT-1", cylinders: 4, stroke: 4 }),
  );
  path = `/vehicles/${vehicleId}`;
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

async function as(t: TestTeam, role: "engineer" | "technician" | "viewer") {
  return HttpClient.signedIn(server.url, t.accounts[role].email, TEST_PASSWORD);
}

/** The vehicle page's plain upload (HttpClient.uploadDriveLog); resolves with the new log's id. */
function upload(client: HttpClient, name: string, csv: string) {
  return client.uploadDriveLog(vehicleId, name, csv);
}

async function waitForLog(client: HttpClient, id: number) {
  for (let i = 0; i < 240; i++) {
    const { logs } = JSON.parse((await client.get(`${path}/status`)).html) as {
      logs: { id: number; status: string }[];
    };
    const mine = logs.find((l) => l.id === id);
    if (mine && (mine.status === "done" || mine.status === "failed")) return mine.status;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`drive log ${id} did not finish`);
}

const isolationTarget = (name: string, minDb: number, extra: Record<string, string> = {}) => ({
  intent: "create-target",
  kind: "isolation",
  name,
  rpmFrom: "775",
  rpmTo: "825",
  minDb: String(minDb),
  ...extra,
});

const targetId = async (name: string) =>
  (await targetData(team.id).list(vehicleId)).find((t) => t.name === name)!.id;

/** The "(margin +1.0 dB)" of a target's latest verdict on the vehicle page, as a number. */
function shownMargin(html: string, name: string): { status: string; margin: number } {
  const item = html.slice(html.indexOf(`>${name}<`));
  const m = /data-latest-verdict="([a-z-]+)"[\s\S]*?\(margin ([+−±])([\d.]+) (?:dB|rad\/s²)\)/.exec(
    item,
  );
  expect(m, `no margin shown for ${name}`).not.toBeNull();
  return { status: m![1]!, margin: (m![2] === "−" ? -1 : 1) * Number(m![3]) };
}

describe("targets on the vehicle page", () => {
  it("an engineer sets targets with the page's form; a refused one says why and saves nothing", async () => {
    const engineer = await as(team, "engineer");
    await engineer.get(path);
    const refused = await engineer.post(
      path,
      isolationTarget("Backwards", 10, { rpmFrom: "3000", rpmTo: "1000" }),
    );
    expect(refused.status).toBe(400);
    expect(refused.html).toContain("The highest engine speed must be above the lowest (3000 rpm).");
    const noLimit = await engineer.post(path, {
      intent: "create-target",
      kind: "rattle",
      name: "No limit",
    });
    expect(noLimit.status).toBe(400);
    expect(noLimit.html).toContain("Enter the maximum angular acceleration in rad/s².");

    for (const fields of [
      isolationTarget("Idle isolation, met", met),
      isolationTarget("Idle isolation, strict", strict),
      isolationTarget("Run-up isolation", 10, {
        conditions: "run-up",
        rpmFrom: "1000",
        rpmTo: "3000",
      }),
      {
        intent: "create-target",
        kind: "rattle",
        name: "Idle rattle",
        maxRadS2: "60",
        conditions: "idle-neutral",
      },
    ]) {
      const r = await engineer.post(path, fields);
      expect([fields.name, r.status]).toEqual([fields.name, 200]);
      expect(r.html).toContain(`The target “${fields.name}” is added`);
    }
    const stored = await targetData(team.id).list(vehicleId);
    expect(stored.map((t) => t.name).sort()).toEqual([
      "Idle isolation, met",
      "Idle isolation, strict",
      "Idle rattle",
      "Run-up isolation",
    ]);
    expect(stored.find((t) => t.name === "Idle isolation, met")).toMatchObject({
      kind: "isolation",
      rpmFrom: 775,
      rpmTo: 825,
      minDb: met,
      maxRadS2: null,
      conditions: [],
      gears: [],
    });
    expect(stored.find((t) => t.name === "Idle rattle")).toMatchObject({
      kind: "rattle",
      rpmFrom: null,
      maxRadS2: 60,
      conditions: ["idle-neutral"],
    });
    const audited = await db
      .select({ action: auditEvents.action, detail: auditEvents.detail })
      .from(auditEvents)
      .where(and(eq(auditEvents.teamId, team.id), eq(auditEvents.action, "target-created")));
    expect(audited).toHaveLength(4);
    expect(audited.map((a) => a.detail).join("\n")).toContain("TGT-1: target");
  });

  it("technicians and viewers see the targets but setting, changing or deleting one is 403", async () => {
    const id = await targetId("Idle isolation, met");
    for (const role of ["technician", "viewer"] as const) {
      const client = await as(team, role);
      const page = await client.get(path);
      expect(page.status).toBe(200);
      expect(page.html).toContain("Idle isolation, met");
      expect(page.html).not.toContain("Add a target");
      expect((await client.post(path, isolationTarget(`By ${role}`, 5))).status).toBe(403);
      expect(
        (
          await client.post(path, {
            ...isolationTarget("Changed", 0),
            intent: "update-target",
            targetId: String(id),
          })
        ).status,
      ).toBe(403);
      expect(
        (await client.post(path, { intent: "delete-target", targetId: String(id) })).status,
      ).toBe(403);
    }
    expect((await targetData(team.id).get(id)).minDb).toBe(met);
    expect(await targetData(team.id).list(vehicleId)).toHaveLength(4);
  });

  it("another team's vehicle and target are 404, in the page and in the data layer", async () => {
    const id = await targetId("Idle isolation, met");
    const stranger = await as(other, "engineer");
    expect((await stranger.get(path)).status).toBe(404);
    const theirs = vehicleData(other.id);
    const theirVehicle = await theirs.create(
      vehicleSchema.parse({ name: "Their car", identifier: "OTH-1", cylinders: 4, stroke: 4 }),
    );
    await stranger.get(`/vehicles/${theirVehicle}`);
    // Our vehicle in the URL, or our target's id on their own vehicle.
    expect((await stranger.post(path, isolationTarget("Sneaky", 0))).status).toBe(404);
    for (const intent of ["update-target", "delete-target"])
      expect(
        (
          await stranger.post(`/vehicles/${theirVehicle}`, {
            ...isolationTarget("Sneaky", 0),
            intent,
            targetId: String(id),
          })
        ).status,
      ).toBe(404);
    await expect(targetData(other.id).get(id)).rejects.toMatchObject({ status: 404 });
    await expect(targetData(other.id).remove(id)).rejects.toMatchObject({ status: 404 });
    await expect(
      targetData(other.id).create(
        vehicleId,
        { kind: "rattle", name: "x", maxRadS2: 1, conditions: [], gears: [] },
        null,
      ),
    ).rejects.toMatchObject({ status: 404 });
    // Our own target through another of our vehicles' pages is 404 too.
    const second = await vehicleData(team.id).create(
      vehicleSchema.parse({ name: "Second car", identifier: "TGT-2", cylinders: 4, stroke: 4 }),
    );
    const engineer = await as(team, "engineer");
    await engineer.get(`/vehicles/${second}`);
    expect(
      (
        await engineer.post(`/vehicles/${second}`, {
          intent: "delete-target",
          targetId: String(id),
        })
      ).status,
    ).toBe(404);
    expect((await targetData(team.id).get(id)).name).toBe("Idle isolation, met");
  });

  it("a drive log analysed after the targets exist shows pass or fail with its margin", async () => {
    const technician = await as(team, "technician");
    await technician.get(path);
    const logId = await upload(technician, "idle-800.csv", analyticIdleCsv(idle));
    expect(await waitForLog(technician, logId)).toBe("done");

    const logs = await vehicleData(team.id).logsWithSummary(vehicleId);
    const verdicts = (await targetData(team.id).verdictsForLogs(vehicleId, logs)).get(logId)!;
    const byName = new Map(verdicts.map((v) => [v.name, v]));
    // Isolation 11.2 dB (two-mass formula, above) against minDb = analytic − 1 and + 1: margins
    // +1 and −1 dB, within the pipeline's 0.3 dB. Margin = value − minDb (docs/targets.md).
    const passed = byName.get("Idle isolation, met")!;
    expect(passed).toMatchObject({ status: "pass", unit: "dB", limit: met, atRpm: 800 });
    expect(Math.abs(passed.value! - expectedDb)).toBeLessThan(0.3);
    expect(Math.abs(passed.margin! - 1)).toBeLessThan(0.3);
    const failed = byName.get("Idle isolation, strict")!;
    expect(failed).toMatchObject({ status: "fail", limit: strict, atRpm: 800 });
    expect(Math.abs(failed.margin! + 1)).toBeLessThan(0.3);
    // Rattle: the larger of the order amplitude and the peak, α = Δω·q·Ω ≈ 48 rad/s² within 5 %;
    // margin = 60 − value (docs/targets.md).
    const rattle = byName.get("Idle rattle")!;
    expect(rattle).toMatchObject({ status: "pass", unit: "rad/s²", limit: 60 });
    expect(Math.abs(rattle.value! / expectedAlpha - 1)).toBeLessThan(0.05);
    expect(rattle.margin).toBeCloseTo(60 - rattle.value!, 1);
    // A run-up target does not apply to an idle log (its conditions).
    expect(byName.get("Run-up isolation")!.status).toBe("not-applicable");

    // The drive-log page's path (the result JSON) gives the same verdicts.
    const latest = await vehicleData(team.id).latestAnalysis(logId);
    const again = await targetData(team.id).verdictsForAnalysis(
      vehicleId,
      logs.find((l) => l.id === logId)!,
      latest!.result,
    );
    expect(again).toEqual(verdicts);

    // The vehicle page shows each verdict with its margin (one decimal: 0.05 more tolerance).
    const page = (await technician.get(path)).html;
    const shownPass = shownMargin(page, "Idle isolation, met");
    expect(shownPass.status).toBe("pass");
    expect(Math.abs(shownPass.margin - 1)).toBeLessThan(0.35);
    const shownFail = shownMargin(page, "Idle isolation, strict");
    expect(shownFail.status).toBe("fail");
    expect(Math.abs(shownFail.margin + 1)).toBeLessThan(0.35);
    // The drive-log table's row: two passed (isolation, rattle), one failed.
    const row = page.slice(page.indexOf(`data-log-id="${logId}"`));
    expect(row.slice(0, row.indexOf("</tr>"))).toMatch(/passed 2[\s\S]*failed 1/);
  });

  it("an engineer changes and deletes a target; the verdicts follow at once, and both are audited", async () => {
    const engineer = await as(team, "engineer");
    await engineer.get(path);
    const id = await targetId("Idle isolation, strict");
    const lowered = Math.round((expectedDb - 2) * 100) / 100;
    const changed = await engineer.post(path, {
      ...isolationTarget("Idle isolation, lowered", lowered),
      intent: "update-target",
      targetId: String(id),
    });
    expect(changed.status).toBe(200);
    const logs = await vehicleData(team.id).logsWithSummary(vehicleId);
    const [log] = logs;
    const verdict = (await targetData(team.id).verdictsForLogs(vehicleId, logs))
      .get(log!.id)!
      .find((v) => v.targetId === id)!;
    // 11.2 dB against analytic − 2: margin +2 dB within 0.3 dB.
    expect(verdict).toMatchObject({ name: "Idle isolation, lowered", status: "pass" });
    expect(Math.abs(verdict.margin! - 2)).toBeLessThan(0.3);

    // Deleting asks first (issue 11): the delete button alone (as posted without JavaScript)
    // brings the question back and changes nothing; only confirm=yes deletes.
    const asked = await engineer.post(path, { intent: "delete-target", targetId: String(id) });
    expect(asked.status).toBe(200);
    expect(asked.html).toContain("Delete the target “Idle isolation, lowered”?");
    expect(asked.html).toContain(`data-delete-confirm="${id}"`);
    expect((await targetData(team.id).get(id)).name).toBe("Idle isolation, lowered");
    const deleted = await engineer.post(path, {
      intent: "delete-target",
      targetId: String(id),
      confirm: "yes",
    });
    expect(deleted.status).toBe(200);
    expect(deleted.html).toContain("The target “Idle isolation, lowered” is deleted.");
    await expect(targetData(team.id).get(id)).rejects.toMatchObject({ status: 404 });
    const actions = (
      await db
        .select({ action: auditEvents.action })
        .from(auditEvents)
        .where(eq(auditEvents.teamId, team.id))
    ).map((a) => a.action);
    expect(actions).toContain("target-changed");
    expect(actions).toContain("target-deleted");
  });
});
