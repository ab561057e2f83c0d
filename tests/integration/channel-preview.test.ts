import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { readFile } from "node:fs/promises";
import { join } from "node:path";
import { HttpClient } from "../support/http-client";
import { repoRoot, startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// The channel chooser's preview (GET /vehicles/:v/logs/:l/channel-preview.json) against the
// real MariaDB and the production server, on an MDF4 file written by an independent
// implementation; its expected.json (an independent reader's values) gives the ranges.
const testbed = await useJobTestbed("preview");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { pool } = await import("~/lib/infra/db.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;

const FIXTURE = "tests/fixtures/mdf4/drive-log-plain";
let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
let other: TestTeam;
let token: string;

beforeAll(async () => {
  [server, team, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam("Preview"),
    createTestTeam("Elsewhere"),
  ]);
  token = (
    await createApiToken({
      userId: team.accounts.engineer.id,
      teamId: team.id,
      name: "preview test",
      expiresAt: null,
    })
  ).token;
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

function api(path: string, init: RequestInit = {}) {
  return fetch(server.url + path, {
    ...init,
    headers: { Authorization: `Bearer ${token}`, ...(init.headers ?? {}) },
  });
}

/** The fixture uploaded to a new vehicle; its ids once the first analysis is settled. */
async function uploadFixture() {
  const v = await api("/api/v1/vehicles", {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({
      name: "Kestrel preview car",
      identifier: `KP-${Math.random().toString(36).slice(2, 8)}`,
      cylinders: 4,
      stroke: 4,
    }),
  });
  expect(v.status).toBe(201);
  const vehicleId = ((await v.json()) as { vehicle: { id: number } }).vehicle.id;
  const form = new FormData();
  form.set("file", new Blob([await readFile(join(repoRoot, `${FIXTURE}.mf4`))]), "kestrel.mf4");
  const r = await api(`/api/v1/vehicles/${vehicleId}/logs`, { method: "POST", body: form });
  expect(r.status).toBe(202);
  const logId = ((await r.json()) as { log: { id: number } }).log.id;
  for (let i = 0; i < 240; i++) {
    const s = (await (await api(`/api/v1/logs/${logId}`)).json()) as { log: { status: string } };
    if (s.log.status === "done" || s.log.status === "failed") return { vehicleId, logId };
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`drive log ${logId} did not finish`);
}

/** min and max of one channel as the independent reader found it (expected.json). */
async function expectedRange(channel: string): Promise<[number, number]> {
  const doc = JSON.parse(await readFile(join(repoRoot, `${FIXTURE}.expected.json`), "utf8")) as {
    groups: { channels: { name: string; values: number[] }[] }[];
  };
  const values = doc.groups.flatMap((g) => g.channels).find((c) => c.name === channel)!.values;
  return [Math.min(...values), Math.max(...values)];
}

const numbers = (xs: (number | null)[]) => xs.filter((x): x is number => x !== null);

describe("GET …/logs/:logId/channel-preview.json", () => {
  it("gives the picked speeds against time with the ranges the independent reader found; 422 for a non-speed pick; 404 for another team", async () => {
    const { vehicleId, logId } = await uploadFixture();
    const path = `/vehicles/${vehicleId}/logs/${logId}/channel-preview.json`;
    const viewer = await HttpClient.signedIn(server.url, team.accounts.viewer.email, TEST_PASSWORD);

    const r = await viewer.get(`${path}?crank=EngSpd&gearbox=GbxInpShaftSpd`);
    expect(r.status).toBe(200);
    const body = JSON.parse(r.html) as Record<string, (number | null)[]>;
    expect(Object.keys(body).sort()).toEqual(["crankRpm", "gearboxRpm", "timeS"]);
    const { timeS, crankRpm, gearboxRpm } = body as {
      timeS: number[];
      crankRpm: (number | null)[];
      gearboxRpm: (number | null)[];
    };
    expect(crankRpm).toHaveLength(timeS.length);
    expect(gearboxRpm).toHaveLength(timeS.length);
    // A few hundred points for 8000 samples, in time order, over the file's 4 s (expected.json).
    expect(timeS.length).toBeGreaterThan(100);
    expect(timeS.length).toBeLessThanOrEqual(600);
    for (let i = 1; i < timeS.length; i++) expect(timeS[i]!).toBeGreaterThan(timeS[i - 1]!);
    expect(timeS[0]).toBeCloseTo(0, 3);
    expect(timeS.at(-1)!).toBeGreaterThan(3.99);
    // Per-bucket min and max keep the extremes: the ranges are the independent reader's, to the
    // preview's 0.1 rpm rounding (EngSpd is in rpm, 0.25 rpm/bit; GbxInpShaftSpd in rpm).
    const [cLo, cHi] = await expectedRange("EngSpd");
    const [gLo, gHi] = await expectedRange("GbxInpShaftSpd");
    expect(Math.abs(Math.min(...numbers(crankRpm)) - cLo)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(Math.max(...numbers(crankRpm)) - cHi)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(Math.min(...numbers(gearboxRpm)) - gLo)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(Math.max(...numbers(gearboxRpm)) - gHi)).toBeLessThanOrEqual(0.05);

    // The unit picked is applied: rpm read as deg/s is a sixth as fast (360 deg/s = 60 rpm).
    const degS = await viewer.get(`${path}?crank=EngSpd&gearbox=GbxInpShaftSpd&crankUnit=deg/s`);
    expect(degS.status).toBe(200);
    const slow = JSON.parse(degS.html) as { crankRpm: (number | null)[] };
    expect(Math.abs(Math.max(...numbers(slow.crankRpm)) * 6 - cHi)).toBeLessThanOrEqual(0.6);

    // The pedal position is in %, not a speed: refused with the reader's code and sentence.
    const pedal = await viewer.get(`${path}?crank=AccPedlPosn&gearbox=GbxInpShaftSpd`);
    expect(pedal.status).toBe(422);
    const refusal = JSON.parse(pedal.html) as { error: { code: string; message: string } };
    expect(refusal.error.code).toBe("unknown_unit");
    expect(refusal.error.message).toContain("AccPedlPosn");

    // A bad unit and one channel in two roles are refused before the file is read.
    expect((await viewer.get(`${path}?crank=EngSpd&crankUnit=furlongs`)).status).toBe(400);
    expect((await viewer.get(`${path}?crank=EngSpd&gearbox=EngSpd`)).status).toBe(400);

    // Another team's engineer does not learn that the log exists; without a session, no data.
    const stranger = await HttpClient.signedIn(
      server.url,
      other.accounts.engineer.email,
      TEST_PASSWORD,
    );
    expect((await stranger.get(`${path}?crank=EngSpd`)).status).toBe(404);
    const anonymous = await new HttpClient(server.url).get(`${path}?crank=EngSpd`);
    expect(anonymous.status).not.toBe(200);
  });
});
