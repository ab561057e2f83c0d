import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analysisResultSchema } from "~/lib/signal";
import { analyticIdleCsv, expectedIsolationDb, IDLE_800 } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// The vehicle and drive-log pages over HTTP, as a browser without JavaScript uses them: forms
// posted to the page actions, the upload as a plain multipart form. A database of its own,
// because the job runners of other test files' servers must not take these jobs.
const testbed = await useJobTestbed("pages");
const { pool } = await import("~/lib/infra/db.server");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { teamData } = await import("~/lib/data/team-data.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;

let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
let other: TestTeam;

const idle = IDLE_800; // isolation known from the two-mass formula (tests/support/analytic-log.ts)

beforeAll(async () => {
  [server, team, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam("Pages"),
    createTestTeam("Elsewhere"),
  ]);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

async function as(t: TestTeam, role: "engineer" | "technician" | "viewer") {
  return HttpClient.signedIn(server.url, t.accounts[role].email, TEST_PASSWORD);
}

async function makeVehicle(t = team, identifier = `V-${Math.random().toString(36).slice(2, 8)}`) {
  const data = vehicleData(t.id);
  return data.vehicle(
    await data.create(
      vehicleSchema.parse({ name: "Page car", identifier, cylinders: 4, stroke: 4 }),
    ),
  );
}

/**
 * Posts a multipart form like a browser without JavaScript: the csrf field first (so it is read
 * before the file), then the other fields, then the files. `csrf: null` leaves it out.
 */
async function postMultipart(
  client: HttpClient,
  path: string,
  fields: Record<string, string | null>,
  files: { name: string; content: string }[],
) {
  const body = new FormData();
  if (!("csrf" in fields)) body.set("csrf", client.csrf);
  for (const [k, v] of Object.entries(fields)) if (v !== null) body.set(k, v);
  for (const f of files) body.append("file", new Blob([f.content], { type: "text/csv" }), f.name);
  const response = await fetch(server.url + path, {
    method: "POST",
    redirect: "manual",
    headers: {
      Cookie: client.cookieHeader(),
      "X-Forwarded-For": client.ip,
      Origin: server.url,
    },
    body,
  });
  return Object.assign(response, { html: await response.text() });
}

async function waitForLogs(client: HttpClient, vehicleId: number, ids: number[]) {
  for (let i = 0; i < 240; i++) {
    const r = await client.get(`/vehicles/${vehicleId}/status`);
    const { logs } = JSON.parse(r.html) as { logs: { id: number; status: string }[] };
    const mine = logs.filter((l) => ids.includes(l.id));
    if (
      mine.length === ids.length &&
      mine.every((l) => l.status === "done" || l.status === "failed")
    )
      return mine;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`drive logs ${ids.join(", ")} did not finish`);
}

describe("vehicle forms", () => {
  it("an engineer creates a vehicle with the form; the same identifier again is a field error", async () => {
    const engineer = await as(team, "engineer");
    await engineer.get("/vehicles/new");
    const fields = {
      intent: "save",
      name: "Form car",
      identifier: "FORM-1",
      cylinders: "3",
      stroke: "4",
    };
    const made = await engineer.post("/vehicles/new", fields);
    expect(made.status).toBe(302);
    const id = Number(/^\/vehicles\/(\d+)$/.exec(made.headers.get("location") ?? "")?.[1]);
    const stored = await vehicleData(team.id).vehicle(id);
    // Defaults from the form's schema: rattle limit 500 rad/s² (Shock and Vibration 2022, art. 2954825).
    expect(stored).toMatchObject({ name: "Form car", cylinders: 3, rattleLimitRadS2: 500 });
    const page = await engineer.get(`/vehicles/${id}`);
    // Three cylinders, four-stroke: firing order z/2 = 1.5 (common practice).
    expect(page.html).toContain("order 1.5");

    await engineer.get(`/vehicles/${id}/edit`);
    const edited = await engineer.post(`/vehicles/${id}/edit`, {
      ...fields,
      firingOrderOverride: "1",
      gearRatios: "3.73, 2.05 1.32",
    });
    expect(edited.status).toBe(302);
    expect(edited.headers.get("location")).toBe(`/vehicles/${id}?notice=saved`);
    expect(await vehicleData(team.id).vehicle(id)).toMatchObject({
      firingOrderOverride: 1,
      gearRatios: [3.73, 2.05, 1.32],
    });

    const again = await engineer.post("/vehicles/new", fields);
    expect(again.status).toBe(400);
    expect(again.html).toContain("Another vehicle of the team is FORM-1 already.");
    // Both changes are in the team's audit log, with who made them.
    const log = await teamData(team.id).auditLog();
    const mine = log.filter((e) => e.detail === `vehicle ${id} (FORM-1)`).map((e) => e.action);
    expect(mine.sort()).toEqual(["vehicle-changed", "vehicle-created"]);
  });

  it("a viewer's and a technician's POST to the create action get 403, and nothing is created", async () => {
    for (const role of ["viewer", "technician"] as const) {
      const client = await as(team, role);
      await client.get("/vehicles");
      const r = await client.post("/vehicles/new", {
        intent: "save",
        name: `Not allowed ${role}`,
        identifier: `NO-${role}`,
        cylinders: "4",
        stroke: "4",
      });
      expect(r.status).toBe(403);
    }
    const names = (await vehicleData(team.id).list({ archived: true })).map((v) => v.name);
    expect(names.filter((n) => n.startsWith("Not allowed"))).toEqual([]);
  });

  it("an engineer archives and restores a vehicle; a viewer's archive POST gets 403", async () => {
    const vehicle = await makeVehicle();
    const viewer = await as(team, "viewer");
    await viewer.get(`/vehicles/${vehicle.id}`);
    expect((await viewer.post(`/vehicles/${vehicle.id}`, { intent: "archive" })).status).toBe(403);
    const engineer = await as(team, "engineer");
    await engineer.get(`/vehicles/${vehicle.id}`);
    expect((await engineer.post(`/vehicles/${vehicle.id}`, { intent: "archive" })).status).toBe(
      200,
    );
    expect((await engineer.get("/vehicles")).html).not.toContain(vehicle.identifier);
    expect((await engineer.get("/vehicles?archived=1")).html).toContain(vehicle.identifier);
    // An archived vehicle takes no uploads, also through the form.
    const technician = await as(team, "technician");
    await technician.get(`/vehicles/${vehicle.id}`);
    const refused = await postMultipart(
      technician,
      `/vehicles/${vehicle.id}`,
      { intent: "upload" },
      [{ name: "late.csv", content: analyticIdleCsv({ ...idle, durationS: 2 }) }],
    );
    expect(refused.status).toBe(409);
    expect((await engineer.post(`/vehicles/${vehicle.id}`, { intent: "restore" })).status).toBe(
      200,
    );
    expect((await engineer.get("/vehicles")).html).toContain(vehicle.identifier);
    const actions = (await teamData(team.id).auditLog())
      .filter((e) => e.detail === `vehicle ${vehicle.id} (${vehicle.identifier})`)
      .map((e) => e.action);
    expect(actions.sort()).toEqual(["vehicle-archived", "vehicle-restored"]);
  });

  it("another team's vehicle, drive log and raw file are 404", async () => {
    const vehicle = await makeVehicle();
    const technician = await as(team, "technician");
    await technician.get(`/vehicles/${vehicle.id}`);
    const r = await postMultipart(technician, `/vehicles/${vehicle.id}`, { intent: "upload" }, [
      { name: "ours.csv", content: analyticIdleCsv({ ...idle, durationS: 2 }) },
    ]);
    const logId = new URL(r.headers.get("location")!, server.url).searchParams.get("uploaded");
    expect(logId).toMatch(/^\d+$/);
    const stranger = await as(other, "engineer");
    for (const path of [
      `/vehicles/${vehicle.id}`,
      `/vehicles/${vehicle.id}/edit`,
      `/vehicles/${vehicle.id}/status`,
      `/vehicles/${vehicle.id}/logs/${logId}`,
      `/vehicles/${vehicle.id}/logs/${logId}/file`,
    ]) {
      expect([path, (await stranger.get(path)).status]).toEqual([path, 404]);
    }
    // Their own vehicle with our drive log's id in the URL is a 404 too.
    const theirs = await makeVehicle(other);
    expect((await stranger.get(`/vehicles/${theirs.id}/logs/${logId}`)).status).toBe(404);
  });
});

describe("the upload form without JavaScript", () => {
  it("a technician's multipart form creates drive logs that are analysed", async () => {
    const vehicle = await makeVehicle();
    const technician = await as(team, "technician");
    await technician.get(`/vehicles/${vehicle.id}`);
    const r = await postMultipart(
      technician,
      `/vehicles/${vehicle.id}`,
      {
        intent: "upload",
        condition: "idle-neutral",
        gear: "",
        testDate: "2026-03-14",
        notes: "form",
      },
      [
        { name: "idle-a.csv", content: analyticIdleCsv(idle) },
        { name: "idle-b.csv", content: analyticIdleCsv({ ...idle, durationS: 6 }) },
      ],
    );
    expect(r.status).toBe(302);
    const location = new URL(r.headers.get("location")!, server.url);
    expect(location.pathname).toBe(`/vehicles/${vehicle.id}`);
    const ids = location.searchParams.get("uploaded")!.split(",").map(Number);
    expect(ids).toHaveLength(2);
    const finished = await waitForLogs(technician, vehicle.id, ids);
    expect(finished.map((l) => l.status)).toEqual(["done", "done"]);

    const logs = await vehicleData(team.id).logs(vehicle.id);
    const first = logs.find((l) => l.fileName === "idle-a.csv")!;
    expect(first).toMatchObject({
      condition: "idle-neutral",
      testDate: "2026-03-14",
      damperVariant: "A",
    });
    const result = analysisResultSchema.parse(await vehicleData(team.id).latestResult(first.id));
    // Isolation at 800 rpm against −20·log10|H(r)| (Harris ch. 30 / Ogata 9-14), 0.3 dB as in the API test.
    const at800 = result.isolation.find((p) => Math.abs(p.rpm - 800) <= 25);
    expect(Math.abs(at800!.dB - expectedIsolationDb(idle))).toBeLessThan(0.3);

    const page = await technician.get(`/vehicles/${vehicle.id}/logs/${first.id}`);
    expect(page.status).toBe(200);
    expect(page.html).toContain("Analysis version 1");
    expect(page.html).toContain("About these verdicts");
    // The raw file comes back as uploaded.
    const raw = await technician.get(`/vehicles/${vehicle.id}/logs/${first.id}/file`);
    expect(raw.status).toBe(200);
    expect(raw.html).toBe(analyticIdleCsv(idle));
  });

  it("the same file again is accepted and named as a repeat of the earlier drive log", async () => {
    const vehicle = await makeVehicle();
    const technician = await as(team, "technician");
    await technician.get(`/vehicles/${vehicle.id}`);
    const file = { name: "twice.csv", content: analyticIdleCsv({ ...idle, durationS: 3 }) };
    const first = await postMultipart(technician, `/vehicles/${vehicle.id}`, { intent: "upload" }, [
      file,
    ]);
    const firstId = new URL(first.headers.get("location")!, server.url).searchParams.get(
      "uploaded",
    );
    const second = await postMultipart(
      technician,
      `/vehicles/${vehicle.id}`,
      { intent: "upload" },
      [file],
    );
    const back = new URL(second.headers.get("location")!, server.url);
    expect(back.searchParams.get("dup")).toBe(`${back.searchParams.get("uploaded")}-${firstId}`);
    const page = await technician.get(back.pathname + back.search);
    expect(page.html).toContain(`the same file was uploaded before as drive log ${firstId}`);
  });

  it("without the CSRF token, or as a viewer, the upload is refused and no drive log is made", async () => {
    const vehicle = await makeVehicle();
    const technician = await as(team, "technician");
    await technician.get(`/vehicles/${vehicle.id}`);
    const file = { name: "x.csv", content: analyticIdleCsv({ ...idle, durationS: 2 }) };
    const noToken = await postMultipart(
      technician,
      `/vehicles/${vehicle.id}`,
      { csrf: null, intent: "upload" },
      [file],
    );
    expect(noToken.status).toBe(403);
    const viewer = await as(team, "viewer");
    await viewer.get(`/vehicles/${vehicle.id}`);
    const denied = await postMultipart(viewer, `/vehicles/${vehicle.id}`, { intent: "upload" }, [
      file,
    ]);
    expect(denied.status).toBe(403);
    expect(await vehicleData(team.id).logs(vehicle.id)).toEqual([]);
  });
});

describe("the drive-log page", () => {
  it("an unrecognised header offers the column mapping, which is remembered and re-runs the analysis", async () => {
    const vehicle = await makeVehicle();
    const technician = await as(team, "technician");
    await technician.get(`/vehicles/${vehicle.id}`);
    // "shaft b" names no gearbox-side word, so the ingest cannot tell the gearbox channel.
    const csv = analyticIdleCsv(idle).replace(
      "time [s],crank speed [rpm],gearbox input speed [rpm]",
      "time [s],engine speed [rpm],shaft b [rpm]",
    );
    const r = await postMultipart(technician, `/vehicles/${vehicle.id}`, { intent: "upload" }, [
      { name: "unnamed.csv", content: csv },
    ]);
    const id = Number(new URL(r.headers.get("location")!, server.url).searchParams.get("uploaded"));
    expect((await waitForLogs(technician, vehicle.id, [id]))[0]!.status).toBe("failed");

    const path = `/vehicles/${vehicle.id}/logs/${id}`;
    const page = await technician.get(path);
    expect(page.html).toContain("Channel chooser");
    expect(page.html).toContain("shaft b [rpm]");
    expect(page.html).toContain("The first 20 rows of the file");

    const unknown = await technician.post(path, { intent: "map", gearboxColumn: "no such column" });
    expect(unknown.status).toBe(400);
    expect(unknown.html).toContain("The file has no column “no such column”.");

    const mapped = await technician.post(path, {
      intent: "map",
      gearboxColumn: "shaft b [rpm]",
      gearboxUnit: "rpm",
    });
    expect(mapped.status).toBe(200);
    expect((await waitForLogs(technician, vehicle.id, [id]))[0]!.status).toBe("done");
    expect((await vehicleData(team.id).vehicle(vehicle.id)).columnMapping).toEqual({
      gearboxColumn: "shaft b [rpm]",
      gearboxUnit: "rpm",
    });
  });

  it("an engineer re-analyses with another block length: a new version, the old one kept; a technician may not", async () => {
    const vehicle = await makeVehicle();
    const technician = await as(team, "technician");
    await technician.get(`/vehicles/${vehicle.id}`);
    const r = await postMultipart(technician, `/vehicles/${vehicle.id}`, { intent: "upload" }, [
      { name: "again.csv", content: analyticIdleCsv({ ...idle, durationS: 8 }) },
    ]);
    const id = Number(new URL(r.headers.get("location")!, server.url).searchParams.get("uploaded"));
    await waitForLogs(technician, vehicle.id, [id]);
    const path = `/vehicles/${vehicle.id}/logs/${id}`;

    await technician.get(path);
    expect((await technician.post(path, { intent: "reanalyse", revsPerBlock: "16" })).status).toBe(
      403,
    );

    const engineer = await as(team, "engineer");
    await engineer.get(path);
    const bad = await engineer.post(path, { intent: "reanalyse", revsPerBlock: "0" });
    expect(bad.status).toBe(400);
    expect(bad.html).toContain("At least 1 revolution per block.");
    expect((await engineer.post(path, { intent: "reanalyse", revsPerBlock: "16" })).status).toBe(
      200,
    );
    await waitForLogs(engineer, vehicle.id, [id]);
    const result = analysisResultSchema.parse(await vehicleData(team.id).latestResult(id));
    expect(result.settings.revsPerBlock).toBe(16);
    const page = await engineer.get(path);
    expect(page.html).toContain("Analysis version 2");
    expect(page.html).toContain("Version 1, made");
  });
});
