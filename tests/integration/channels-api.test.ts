import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readFile } from "node:fs/promises";
import { join } from "node:path";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { repoRoot, startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// Issue 14's API and settings: GET /api/v1/logs/:logId/channels, the upload's channel fields,
// the team's channel names (Logger vocabulary) and an ASAM MDF4 upload, against the real
// MariaDB and the production server. A database of its own (job runners of other files).
const testbed = await useJobTestbed("channels");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { db, pool } = await import("~/lib/infra/db.server");
const { auditEvents } = await import("~/lib/infra/db/schema");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { teamData } = await import("~/lib/data/team-data.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;

let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
let other: TestTeam;
const tokens: Record<string, string> = {};
const idle = IDLE_800;

beforeAll(async () => {
  [server, team, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam("Channels"),
    createTestTeam("Elsewhere"),
  ]);
  for (const [key, t, role] of [
    ["technician", team, "technician"],
    ["viewer", team, "viewer"],
    ["engineer", team, "engineer"],
    ["other", other, "engineer"],
  ] as const) {
    const made = await createApiToken({
      userId: t.accounts[role].id,
      teamId: t.id,
      name: `test ${key}`,
      expiresAt: null,
    });
    tokens[key] = made.token;
  }
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

function api(path: string, token: string | null, init: RequestInit = {}) {
  const auth: Record<string, string> = token ? { Authorization: `Bearer ${token}` } : {};
  return fetch(server.url + path, { ...init, headers: { ...auth, ...(init.headers ?? {}) } });
}

async function createVehicle() {
  const r = await api("/api/v1/vehicles", tokens.engineer!, {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({
      name: "Kestrel channel car",
      identifier: `K-${Math.random().toString(36).slice(2, 8)}`,
      cylinders: 4,
      stroke: 4,
    }),
  });
  expect(r.status).toBe(201);
  return ((await r.json()) as { vehicle: { id: number } }).vehicle;
}

function upload(
  vehicleId: number,
  bytes: string | Uint8Array<ArrayBuffer>,
  fields: Record<string, string> = {},
  name = "kestrel.csv",
) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  form.set("file", new Blob([bytes]), name);
  return api(`/api/v1/vehicles/${vehicleId}/logs`, tokens.technician!, {
    method: "POST",
    body: form,
  });
}

async function uploaded(r: Response): Promise<number> {
  expect(r.status).toBe(202);
  return ((await r.json()) as { log: { id: number } }).log.id;
}

async function waitForLog(id: number) {
  for (let i = 0; i < 240; i++) {
    const r = await api(`/api/v1/logs/${id}`, tokens.viewer!);
    const { log } = (await r.json()) as { log: { status: string; error: unknown } };
    if (log.status === "done" || log.status === "failed") return log;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`drive log ${id} did not finish`);
}

/** The analytic idle log with a fourth column (oil temperature, constant 85). */
function fourColumns(): string {
  return analyticIdleCsv(idle)
    .split("\n")
    .map((l, i) => (l === "" ? l : i === 0 ? `${l},oil temp [degC]` : `${l},85`))
    .join("\n");
}

/** The analytic idle log with names no built-in recognition knows (a logger's own). */
const loggerNames = (csv: string) =>
  csv.replace("time [s],crank speed [rpm],gearbox input speed [rpm]", "Zeit,Kanal1,Kanal2");

describe("GET /api/v1/logs/:logId/channels", () => {
  it("lists every column with exactly the public fields, counts, ranges and roles", async () => {
    const vehicle = await createVehicle();
    const id = await uploaded(await upload(vehicle.id, fourColumns()));
    const r = await api(`/api/v1/logs/${id}/channels`, tokens.viewer!);
    expect(r.status).toBe(200);
    const { channels } = (await r.json()) as { channels: Record<string, unknown>[] };
    expect(channels).toHaveLength(4);
    for (const c of channels)
      expect(Object.keys(c).sort()).toEqual(
        ["group", "max", "min", "name", "role", "sampleRateHz", "samples", "unit"].sort(),
      );
    const rows = Math.round(idle.durationS * idle.sampleRateHz);
    const crank = channels.find((c) => c.role === "crank")!;
    expect(crank).toMatchObject({ name: "crank speed [rpm]", samples: rows, group: null });
    // 800 + 10·cos(phase) sampled 2000 times a second (by construction, analytic-log.ts).
    expect(Math.abs((crank.min as number) - 790)).toBeLessThan(0.05);
    expect(Math.abs((crank.max as number) - 810)).toBeLessThan(0.05);
    expect(Math.abs((crank.sampleRateHz as number) - idle.sampleRateHz)).toBeLessThan(1);
    expect(channels.find((c) => c.role === "time")).toMatchObject({ name: "time [s]" });
    expect(channels.find((c) => c.role === "gearbox")).toMatchObject({ samples: rows });
    expect(channels.find((c) => String(c.name).startsWith("oil temp"))).toMatchObject({
      role: null,
      min: 85,
      max: 85,
    });
  });

  it("answers as GET /api/v1/logs/:logId does: another team 404, no credentials 401", async () => {
    const vehicle = await createVehicle();
    const id = await uploaded(await upload(vehicle.id, analyticIdleCsv(idle)));
    const foreign = await api(`/api/v1/logs/${id}/channels`, tokens.other!);
    expect(foreign.status).toBe(404);
    expect(await foreign.json()).toMatchObject({ error: { code: "not_found" } });
    const anonymous = await api(`/api/v1/logs/${id}/channels`, null);
    expect(anonymous.status).toBe(401);
    expect(await anonymous.json()).toMatchObject({ error: { code: expect.any(String) } });
    const missing = await api(`/api/v1/logs/999999999/channels`, tokens.viewer!);
    expect(missing.status).toBe(404);
  });
});

describe("the upload's channel fields", () => {
  it("timeChannel, crankChannel, gearboxChannel and the units become the drive log's chosen mapping", async () => {
    const vehicle = await createVehicle();
    const id = await uploaded(
      await upload(vehicle.id, loggerNames(analyticIdleCsv(idle)), {
        timeChannel: "Zeit",
        crankChannel: "Kanal1",
        gearboxChannel: "Kanal2",
        crankUnit: "rpm",
        gearboxUnit: "rpm",
      }),
    );
    // Without the fields these names are not recognised (drive-log-pages.test.ts shows the failure).
    expect(await waitForLog(id)).toMatchObject({ status: "done" });
    expect(await vehicleData(team.id).appliedColumns(id)).toMatchObject({
      source: "chosen",
      mapping: {
        timeColumn: "Zeit",
        crankColumn: "Kanal1",
        gearboxColumn: "Kanal2",
        crankUnit: "rpm",
        gearboxUnit: "rpm",
      },
    });
  });

  it("refuses a bad unit or one channel for two roles with 400, naming the field; nothing is kept", async () => {
    const vehicle = await createVehicle();
    const badUnit = await upload(vehicle.id, analyticIdleCsv(idle), { crankUnit: "furlongs" });
    expect(badUnit.status).toBe(400);
    const a = (await badUnit.json()) as { error: { code: string; message: string } };
    expect(a.error.code).toBe("invalid_channel_choice");
    expect(a.error.message).toMatch(/^crankUnit: /);
    const twice = await upload(vehicle.id, analyticIdleCsv(idle), {
      crankChannel: "Kanal1",
      gearboxChannel: "Kanal1",
    });
    expect(twice.status).toBe(400);
    expect(((await twice.json()) as { error: { message: string } }).error.message).toMatch(
      /^gearboxChannel: /,
    );
    expect(await vehicleData(team.id).logs(vehicle.id)).toEqual([]);
  });
});

describe("the team's channel names (Logger vocabulary)", () => {
  it("an engineer adds names, a technician is refused with 403; jobs freeze and use them", async () => {
    const technician = await HttpClient.signedIn(
      server.url,
      team.accounts.technician.email,
      TEST_PASSWORD,
    );
    await technician.get("/team");
    const denied = await technician.post("/team", {
      intent: "add-channel-name",
      name: "Kanal1",
      role: "crank",
      unit: "rpm",
    });
    expect(denied.status).toBe(403);
    expect((await teamData(team.id).ingestSettings()).channelNames).toEqual([]);

    const engineer = await HttpClient.signedIn(
      server.url,
      team.accounts.engineer.email,
      TEST_PASSWORD,
    );
    expect((await engineer.get("/team")).html).toContain("Logger vocabulary");
    const badUnit = await engineer.post("/team", {
      intent: "add-channel-name",
      name: "Zeit",
      role: "time",
      unit: "rpm",
    });
    expect(badUnit.status).toBe(400);
    expect(badUnit.html).toContain("A time channel is in s or ms.");
    for (const [name, role, unit] of [
      ["Zeit", "time", "s"],
      ["Kanal1", "crank", "rpm"],
      ["Kanal2", "gearbox", "rpm"],
    ] as const)
      expect(
        (await engineer.post("/team", { intent: "add-channel-name", name, role, unit })).status,
      ).toBe(200);
    expect((await teamData(team.id).ingestSettings()).channelNames).toEqual([
      { name: "Zeit", role: "time", unit: "s" },
      { name: "Kanal1", role: "crank", unit: "rpm" },
      { name: "Kanal2", role: "gearbox", unit: "rpm" },
    ]);
    const audited = await db
      .select({ detail: auditEvents.detail })
      .from(auditEvents)
      .where(eq(auditEvents.teamId, team.id));
    expect(audited.map((a) => a.detail)).toContain("channel name “Kanal1” → crank in rpm");

    // The logger's names are read by the team's vocabulary alone, and the run keeps what it used.
    const vehicle = await createVehicle();
    const id = await uploaded(await upload(vehicle.id, loggerNames(analyticIdleCsv(idle))));
    expect(await waitForLog(id)).toMatchObject({ status: "done" });
    const [version] = await vehicleData(team.id).versions(id);
    expect(version!.team).toEqual({
      channelNames: [
        { name: "Zeit", role: "time", unit: "s" },
        { name: "Kanal1", role: "crank", unit: "rpm" },
        { name: "Kanal2", role: "gearbox", unit: "rpm" },
      ],
      strict: false,
    });

    const removed = await engineer.post("/team", { intent: "remove-channel-name", name: "Kanal2" });
    expect(removed.status).toBe(200);
    expect((await teamData(team.id).ingestSettings()).channelNames).toHaveLength(2);
    expect((await engineer.post("/team", { intent: "set-strict", strict: "on" })).status).toBe(200);
    expect((await teamData(team.id).ingestSettings()).strict).toBe(true);
    expect((await technician.post("/team", { intent: "set-strict", strict: "off" })).status).toBe(
      403,
    );
    await engineer.post("/team", { intent: "set-strict", strict: "off" });
  });
});

describe("an ASAM MDF4 upload", () => {
  it("is accepted and analysed with the channels named in the upload", async () => {
    // Written by an independent MDF4 implementation (tests/fixtures/mdf4/README: origin).
    const bytes = new Uint8Array(
      await readFile(join(repoRoot, "tests/fixtures/mdf4/drive-log-plain.mf4")),
    );
    const vehicle = await createVehicle();
    const id = await uploaded(
      await upload(
        vehicle.id,
        bytes,
        { crankChannel: "EngSpd", gearboxChannel: "GbxInpShaftSpd" },
        "kestrel-run.mf4",
      ),
    );
    expect(await waitForLog(id)).toMatchObject({ status: "done" });
    const r = await api(`/api/v1/logs/${id}/channels`, tokens.viewer!);
    expect(r.status).toBe(200);
    const { channels } = (await r.json()) as { channels: { name: string; unit: string | null }[] };
    expect(channels.map((c) => c.name)).toEqual(
      expect.arrayContaining(["EngSpd", "GbxInpShaftSpd"]),
    );
    const result = (await (await api(`/api/v1/logs/${id}/result`, tokens.viewer!)).json()) as {
      source?: { format: string; channels: { crank: string; gearbox: string } };
    };
    expect(result.source).toMatchObject({
      format: "mdf4",
      channels: { crank: "EngSpd", gearbox: "GbxInpShaftSpd" },
    });

    // The file's header names a start time and a comment: offered once as the test details.
    const path = `/vehicles/${vehicle.id}/logs/${id}`;
    const viewer = await HttpClient.signedIn(server.url, team.accounts.viewer.email, TEST_PASSWORD);
    await viewer.get(path);
    expect((await viewer.post(path, { intent: "use-file-details" })).status).toBe(403);
    const technician = await HttpClient.signedIn(
      server.url,
      team.accounts.technician.email,
      TEST_PASSWORD,
    );
    expect((await technician.get(path)).html).toContain("Use the file&#x27;s date and comment");
    expect((await technician.post(path, { intent: "use-file-details" })).status).toBe(200);
    const filled = await vehicleData(team.id).log(id);
    expect(filled.testDate).toMatch(/^\d{4}-\d{2}-\d{2}$/);
    expect(filled.notes).not.toBe("");
    // Filled now: nothing is offered, and a second post changes nothing (409).
    expect((await technician.get(path)).html).not.toContain("Use the file&#x27;s");
    expect((await technician.post(path, { intent: "use-file-details" })).status).toBe(409);
  });
});
