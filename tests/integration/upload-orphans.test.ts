import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { createHash } from "node:crypto";
import { mkdir, mkdtemp, readdir, rm, stat, utimes, writeFile } from "node:fs/promises";
import { createServer, connect, type Server, type Socket } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { freePort, startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";
import { HttpClient } from "../support/http-client";

// Refused uploads leave nothing behind, a database outage during an upload is a clear 503 with
// nothing kept, and the storage sweep removes what nothing references (issue 12 §6, §7).
// A database and storage folder of this file's own, so every file and row seen is ours.
const testbed = await useJobTestbed("orphans");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { db, pool } = await import("~/lib/infra/db.server");
const { getEnv } = await import("~/lib/infra/env.server");
const { localBlobStore } = await import("~/lib/infra/storage.server");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { logMetadataSchema } = await import("~/lib/domain/vehicle-schema");
const { startStorageSweep, sweepStorage } = await import("~/lib/infra/storage-sweep.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");

/**
 * A TCP relay between the app server and MariaDB that the test can cut: `down()` closes every
 * relayed connection and refuses new ones (what the app sees when the database host dies or
 * is unplugged), `up()` relays again on the same port.
 */
async function databaseRelay(target: number) {
  const port = await freePort();
  const sockets = new Set<Socket>();
  let server: Server | null = null;
  const up = () =>
    new Promise<void>((resolve) => {
      server = createServer((client) => {
        const upstream = connect(target, "127.0.0.1");
        for (const s of [client, upstream]) {
          sockets.add(s);
          s.on("error", () => {});
          s.on("close", () => sockets.delete(s));
        }
        client.pipe(upstream).pipe(client);
      });
      server.listen(port, "127.0.0.1", () => resolve());
    });
  const down = () =>
    new Promise<void>((resolve) => {
      for (const s of sockets) s.destroy();
      server!.close(() => resolve());
    });
  await up();
  return { port, up, down };
}

const relay = await databaseRelay(getEnv().DATABASE_PORT);
let server: Awaited<ReturnType<typeof startServer>>;
let team: Awaited<ReturnType<typeof createTestTeam>>;
let token = "";
let vehicleId = 0;

beforeAll(async () => {
  [server, team] = await Promise.all([
    startServer({ ...testbed.serverEnv, DATABASE_PORT: String(relay.port) }),
    createTestTeam("Orphans"),
  ]);
  token = (
    await createApiToken({
      userId: team.accounts.engineer.id,
      teamId: team.id,
      name: "orphans engineer",
      expiresAt: null,
    })
  ).token;
  const r = await fetch(`${server.url}/api/v1/vehicles`, {
    method: "POST",
    headers: { Authorization: `Bearer ${token}`, "Content-Type": "application/json" },
    body: JSON.stringify({ name: "Orphan car", identifier: "K-ORPH-1", cylinders: 4, stroke: 4 }),
  });
  expect(r.status).toBe(201);
  vehicleId = ((await r.json()) as { vehicle: { id: number } }).vehicle.id;
});
afterAll(async () => {
  await server?.stop();
  await relay.down().catch(() => {});
  await pool.end();
  await testbed.close();
});

const csv = (tag: string) =>
  `time [s],crank speed [rpm],gearbox input speed [rpm]\n# ${tag}\n` +
  "0.001,800,800\n".repeat(2000);

/** Every stored file (key.gz, two folder levels down) and every part in tmp/. */
async function storeContents(root = testbed.storage) {
  const files: string[] = [];
  for (const a of await readdir(root)) {
    if (a === "tmp") continue;
    for (const b of await readdir(join(root, a)))
      files.push(...(await readdir(join(root, a, b))).map((f) => `${a}/${b}/${f}`));
  }
  return { files, parts: await readdir(join(root, "tmp")) };
}

async function driveLogCount() {
  const [rows] = await pool.query("SELECT COUNT(*) AS n FROM drive_logs WHERE vehicle_id = ?", [
    vehicleId,
  ]);
  return Number((rows as { n: number }[])[0]!.n);
}

const storedPath = (key: string) => `${key.slice(0, 2)}/${key.slice(2, 4)}/${key}.gz`;

/** The store holds exactly the files of this vehicle's drive logs, no part, and no new drive log. */
async function expectNothingKept(logsBefore: number) {
  const [rows] = await pool.query("SELECT blob_key FROM drive_logs WHERE vehicle_id = ?", [
    vehicleId,
  ]);
  const keys = new Set((rows as { blob_key: string }[]).map((r) => storedPath(r.blob_key)));
  const left = await storeContents();
  expect(left.files.sort()).toEqual([...keys].sort());
  expect(left.parts).toEqual([]);
  expect(await driveLogCount()).toBe(logsBefore);
}

function apiUpload(form: FormData) {
  return fetch(`${server.url}/api/v1/vehicles/${vehicleId}/logs`, {
    method: "POST",
    headers: { Authorization: `Bearer ${token}` },
    body: form,
  });
}

async function technicianClient() {
  const client = new HttpClient(server.url);
  expect((await client.signIn(team.accounts.technician.email, TEST_PASSWORD)).status).toBe(302);
  expect((await client.get(`/vehicles/${vehicleId}`)).status).toBe(200);
  expect(client.csrf).not.toBe("");
  return client;
}

function formUpload(client: HttpClient, form: FormData) {
  return fetch(`${server.url}/vehicles/${vehicleId}`, {
    method: "POST",
    redirect: "manual",
    headers: {
      Cookie: client.cookieHeader(),
      Origin: server.url,
      "X-Forwarded-For": client.ip,
    },
    body: form,
  });
}

describe("a refused upload leaves no stored file and no drive log", { timeout: 60_000 }, () => {
  // Statuses: RFC 9110 §15.5 (400 Bad Request, 403 Forbidden, 422 Unprocessable Content).
  it("form upload with a wrong CSRF token before the file: 403, nothing stored", async () => {
    const client = await technicianClient();
    const form = new FormData();
    form.set("csrf", "x".repeat(43));
    form.set("condition", "idle-neutral");
    form.append("file", new Blob([csv("csrf-first")], { type: "text/csv" }), "a.csv");
    const r = await formUpload(client, form);
    expect(r.status).toBe(403);
    await expectNothingKept(0);
  });

  it("form upload with a wrong CSRF token after the file: 403, the stored file removed", async () => {
    const client = await technicianClient();
    const form = new FormData(); // FormData keeps insertion order (WHATWG XHR §5), file first
    form.append("file", new Blob([csv("csrf-last")], { type: "text/csv" }), "b.csv");
    form.set("condition", "idle-neutral");
    form.set("csrf", "y".repeat(43));
    const r = await formUpload(client, form);
    expect(r.status).toBe(403);
    await expectNothingKept(0);
  });

  it("form upload from another site's page: refused, nothing stored", async () => {
    const client = await technicianClient();
    const form = new FormData();
    form.set("csrf", client.csrf);
    form.append("file", new Blob([csv("origin")], { type: "text/csv" }), "c.csv");
    const r = await fetch(`${server.url}/vehicles/${vehicleId}`, {
      method: "POST",
      redirect: "manual",
      headers: {
        Cookie: client.cookieHeader(),
        Origin: "http://evil.example",
        "X-Forwarded-For": client.ip,
      },
      body: form,
    });
    // React Router's own Origin check answers 400 before the action runs (csrf.server.ts);
    // the upload's own check (403) stands behind it.
    expect([400, 403]).toContain(r.status);
    await expectNothingKept(0);
  });

  it("form upload with invalid test details: 400 with the reason, nothing kept", async () => {
    const client = await technicianClient();
    const form = new FormData();
    form.set("csrf", client.csrf);
    form.set("condition", "no-such-condition");
    form.append("file", new Blob([csv("form-meta")], { type: "text/csv" }), "d.csv");
    const r = await formUpload(client, form);
    expect(r.status).toBe(400);
    await expectNothingKept(0);
  });

  it("API: an empty file is 422 empty_file, nothing kept", async () => {
    const form = new FormData();
    form.append("file", new Blob([""], { type: "text/csv" }), "empty.csv");
    const r = await apiUpload(form);
    expect(r.status).toBe(422);
    expect(((await r.json()) as { error: { code: string } }).error.code).toBe("empty_file");
    await expectNothingKept(0);
  });

  it("API: invalid test details are 400 invalid_metadata, nothing kept", async () => {
    const form = new FormData();
    form.append("file", new Blob([csv("api-meta")], { type: "text/csv" }), "e.csv");
    form.set("gear", "eleventy");
    const r = await apiUpload(form);
    expect(r.status).toBe(400);
    expect(((await r.json()) as { error: { code: string } }).error.code).toBe("invalid_metadata");
    await expectNothingKept(0);
  });

  it("API: the file in another field is 400 missing_file, nothing kept", async () => {
    const form = new FormData();
    form.append("attachment", new Blob([csv("api-field")], { type: "text/csv" }), "f.csv");
    const r = await apiUpload(form);
    expect(r.status).toBe(400);
    expect(((await r.json()) as { error: { code: string } }).error.code).toBe("missing_file");
    await expectNothingKept(0);
  });

  it("a refused upload of bytes a drive log already holds keeps that drive log's file", async () => {
    const text = csv("kept-by-a-log");
    const ok = new FormData();
    ok.append("file", new Blob([text], { type: "text/csv" }), "g.csv");
    expect((await apiUpload(ok)).status).toBe(202);
    const bad = new FormData();
    bad.append("file", new Blob([text], { type: "text/csv" }), "g-again.csv");
    bad.set("condition", "no-such-condition");
    expect((await apiUpload(bad)).status).toBe(400);
    // Reference key: node:crypto SHA-256 of the bytes (FIPS 180-4), the store's naming.
    const key = createHash("sha256").update(text).digest("hex");
    expect((await storeContents()).files).toEqual([storedPath(key)]);
    await expectNothingKept(1);
  });
});

/**
 * A multipart upload sent in two pieces: the fields and the first rows of the file; then, once
 * the server is writing the file, the database goes away and the rest follows.
 */
async function uploadAcrossOutage(
  path: string,
  headers: Record<string, string>,
  fields: Record<string, string>,
) {
  const boundary = "----twistlog-outage";
  const head =
    Object.entries(fields)
      .map(
        ([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`,
      )
      .join("") +
    `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="outage.csv"\r\n` +
    "Content-Type: text/csv\r\n\r\n" +
    csv("outage");
  let release!: () => void;
  const second = new Promise<void>((resolve) => (release = resolve));
  const body = Readable.from(
    (async function* () {
      yield Buffer.from(head);
      await second;
      yield Buffer.from("0.002,801,800\n".repeat(1000) + `\r\n--${boundary}--\r\n`);
    })(),
  );
  const answer = fetch(server.url + path, {
    method: "POST",
    redirect: "manual",
    headers: { "Content-Type": `multipart/form-data; boundary=${boundary}`, ...headers },
    body: Readable.toWeb(body) as ReadableStream,
    duplex: "half",
  } as RequestInit);
  // The server has checked access and is writing the file: now the database goes away.
  await vi.waitFor(async () => expect((await storeContents()).parts.length).toBe(1), {
    timeout: 15_000,
    interval: 20,
  });
  await relay.down();
  release();
  return answer;
}

describe("the database goes away during an upload", { timeout: 90_000 }, () => {
  it("API: 503 database_unavailable, nothing kept; once it is back the next upload works without a restart", async () => {
    const before = await driveLogCount();
    const r = await uploadAcrossOutage(
      `/api/v1/vehicles/${vehicleId}/logs`,
      { Authorization: `Bearer ${token}` },
      { condition: "idle-neutral" },
    );
    // RFC 9110 §15.6.4: 503, the server cannot handle the request now (temporary).
    expect(r.status).toBe(503);
    expect(r.headers.get("content-type")).toMatch(/application\/json/);
    const body = (await r.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe("database_unavailable");
    expect(body.error.message).toMatch(/not saved/);
    await relay.up();
    await expectNothingKept(before);

    const again = new FormData();
    again.append("file", new Blob([csv("after-outage")], { type: "text/csv" }), "h.csv");
    // The very next upload, on the same server process.
    expect((await apiUpload(again)).status).toBe(202);
    expect(await driveLogCount()).toBe(before + 1);
  });

  it("form upload: 503 with a page that says the database is down, nothing kept; then it works again", async () => {
    const client = await technicianClient();
    const before = await driveLogCount();
    const r = await uploadAcrossOutage(
      `/vehicles/${vehicleId}`,
      {
        Cookie: client.cookieHeader(),
        Origin: server.url,
        "X-Forwarded-For": client.ip,
      },
      { csrf: client.csrf, intent: "upload", condition: "idle-neutral" },
    );
    const html = await r.text();
    expect(r.status).toBe(503);
    expect(html).not.toContain("Unexpected Server Error");
    expect(html).toMatch(/database is down/);
    await relay.up();
    await expectNothingKept(before);

    expect(await client.uploadDriveLog(vehicleId, "i.csv", csv("form-after"))).toBeGreaterThan(0);
    expect(await driveLogCount()).toBe(before + 1);
  });
});

describe("the storage sweep", { timeout: 60_000 }, () => {
  const hour = 3600_000;
  let root = "";
  let store: ReturnType<typeof localBlobStore>;
  let oldReferenced = "";
  let oldOrphan = "";
  let freshOrphan = "";
  let reUploaded = "";

  const pathOf = (key: string) => join(root, key.slice(0, 2), key.slice(2, 4), `${key}.gz`);
  const age = (path: string, ms: number) => {
    const when = new Date(Date.now() - ms);
    return utimes(path, when, when);
  };

  beforeAll(async () => {
    // A store of its own (the server's is checked empty above), beside the file's database.
    root = await mkdtemp(join(tmpdir(), "twistlog-sweep-"));
    store = localBlobStore(root);
    const vehicle = await vehicleData(team.id).vehicle(vehicleId);
    const referenced = await store.put(Readable.from([csv("sweep-referenced")]));
    await vehicleData(team.id).addLog({
      vehicle,
      fileName: "referenced.csv",
      stored: referenced,
      metadata: logMetadataSchema.parse({ condition: "idle-neutral" }),
      uploadedBy: null,
    });
    oldReferenced = referenced.key;
    oldOrphan = (await store.put(Readable.from([csv("sweep-orphan-old")]))).key;
    freshOrphan = (await store.put(Readable.from([csv("sweep-orphan-fresh")]))).key;
    // Old and unreferenced, but an upload in flight has just sent the same bytes again: its
    // put marks the file fresh, so the sweep must leave it for the drive log about to come.
    reUploaded = (await store.put(Readable.from([csv("sweep-re-uploaded")]))).key;
    await age(pathOf(reUploaded), 2 * hour);
    expect((await store.put(Readable.from([csv("sweep-re-uploaded")]))).created).toBe(false);
    await age(pathOf(oldReferenced), 2 * hour);
    await age(pathOf(oldOrphan), 2 * hour);
    await mkdir(join(root, "tmp"), { recursive: true });
    await writeFile(join(root, "tmp", "a1b2c3"), "0.001,800,800\n".repeat(100));
    await age(join(root, "tmp", "a1b2c3"), 2 * hour);
    await writeFile(join(root, "tmp", "d4e5f6"), "0.001,800,800\n");
  });
  afterAll(() => rm(root, { recursive: true, force: true }));

  it("removes an old unreferenced file and an old part; keeps a referenced file, fresh ones and one an upload just sent again", async () => {
    const orphanBytes = (await stat(pathOf(oldOrphan))).size;
    const partBytes = (await stat(join(root, "tmp", "a1b2c3"))).size;
    const report = await sweepStorage({ store, db, graceMs: hour });
    // Expected sizes: fs.stat of the files before the sweep.
    expect(report).toEqual({ files: 1, fileBytes: orphanBytes, parts: 1, partBytes });
    const left = await storeContents(root);
    expect(left.files.sort()).toEqual(
      [oldReferenced, freshOrphan, reUploaded]
        .map((k) => `${k.slice(0, 2)}/${k.slice(2, 4)}/${k}.gz`)
        .sort(),
    );
    expect(left.parts).toEqual(["d4e5f6"]);
  });

  it("runs on its own in the app and logs one line with counts and sizes, never names", async () => {
    const orphan = (await store.put(Readable.from([csv("sweep-orphan-timer")]))).key;
    await age(pathOf(orphan), 10_000);
    const lines: string[] = [];
    vi.spyOn(console, "log").mockImplementation((line: string) => void lines.push(line));
    const sweep = startStorageSweep({ store, db, graceMs: 5_000 });
    try {
      await vi.waitFor(() => expect(lines).toHaveLength(1), { timeout: 15_000, interval: 100 });
    } finally {
      await sweep.stop();
    }
    expect(await store.has(orphan)).toBe(false);
    expect(await store.has(oldReferenced)).toBe(true);
    expect(lines[0]).toMatch(
      /^storage sweep: removed \d+ unreferenced stored files? \(\d+ (B|kB)\) and \d+ abandoned upload parts? \(\d+ (B|kB)\) untouched for 5 s$/,
    );
    expect(lines[0]).not.toContain(orphan);
  });
});
