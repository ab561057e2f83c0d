import { createHash } from "node:crypto";
import { strFromU8, unzipSync } from "fflate";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Manifest } from "~/lib/domain/export-pack";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";
import { bearerFetch, trendRunUpCsv, type ApiFetch } from "../support/trend-logs";

// Issue 16, build 3, over HTTP against the real MariaDB and the production server: the export
// pack of a vehicle with two analysed run-ups (one uploaded with hostile text), one drive log
// whose analysis failed, and an empty vehicle. The zip is opened with fflate (an independent
// reader from npm), the checksums recomputed with node:crypto, the CSV files parsed with
// papaparse and compared with the API's own JSON (GET /api/v1/logs/:id/result) converted with
// 1 rpm = 2π/60 rad/s (SI Brochure, 9th ed.: 1 rev = 2π rad, 1 min = 60 s).
const testbed = await useJobTestbed("export");
const { pool } = await import("~/lib/infra/db.server");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { createTestTeam } = await import("../support/accounts");
const { openExportPack } = await import("~/lib/data/export-pack.server");
const { vehicleData } = await import("~/lib/data/vehicles.server");

let server: Awaited<ReturnType<typeof startServer>>;
let team: Awaited<ReturnType<typeof createTestTeam>>;
const api: Record<"engineer" | "viewer" | "other", ApiFetch> = {} as never;

const RAD_S_PER_RPM = (2 * Math.PI) / 60;
/** Relative agreement within 1e-9 (the conversion's floating-point rounding is ~1e-16). */
const close = (actual: unknown, expected: number, what: string) => {
  expect(typeof actual, what).toBe("number");
  expect(Math.abs((actual as number) - expected), what).toBeLessThanOrEqual(
    1e-9 * Math.max(Math.abs(expected), 1e-300),
  );
};
const sha256 = (bytes: Uint8Array | string) => createHash("sha256").update(bytes).digest("hex");

/** A text a spreadsheet would run: =, +, @ first, or - followed by a letter (OWASP "CSV Injection"). */
const RUNNABLE = /^(?:[=+@]|-[A-Za-z])/;

const HOSTILE = {
  fileName: "@SUM(1)+cmd.csv",
  // One line: a multipart form sends a line break in a field as CRLF (HTML's form encoding).
  notes: '=HYPERLINK("http://x.example/?q=1","open") and -cmd',
  damperVariant: "+B",
};

interface Upload {
  id: number;
  fileName: string;
  bytes: string;
  notes: string;
  damperVariant: string;
}
const uploads: Upload[] = [];
let vehicleId: number;
let emptyVehicleId: number;
let failedLogId: number;
/** A vehicle with several run-ups, for the streaming checks. */
let streamVehicleId: number;
const streamLogIds: number[] = [];

async function createVehicle(identifier: string): Promise<number> {
  const r = await api.engineer("/api/v1/vehicles", {
    method: "POST",
    headers: { "Content-Type": "application/json" },
    body: JSON.stringify({ name: `Export car ${identifier}`, identifier, cylinders: 4, stroke: 4 }),
  });
  expect(r.status).toBe(201);
  return ((await r.json()) as { vehicle: { id: number } }).vehicle.id;
}

async function upload(
  fileName: string,
  bytes: string,
  fields: Record<string, string>,
  to = vehicleId,
) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  form.set("file", new Blob([bytes], { type: "text/csv" }), fileName);
  const r = await api.engineer(`/api/v1/vehicles/${to}/logs`, {
    method: "POST",
    body: form,
  });
  expect(r.status, await r.clone().text()).toBe(202);
  return ((await r.json()) as { log: { id: number } }).log.id;
}

async function settle(id: number): Promise<string> {
  for (let i = 0; i < 600; i++) {
    const { log } = (await (await api.viewer(`/api/v1/logs/${id}`)).json()) as {
      log: { status: string };
    };
    if (log.status === "done" || log.status === "failed") return log.status;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`drive log ${id} did not finish`);
}

beforeAll(async () => {
  let other: typeof team;
  [server, team, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam("Export"),
    createTestTeam("Elsewhere"),
  ]);
  for (const [key, t, role] of [
    ["engineer", team, "engineer"],
    ["viewer", team, "viewer"],
    ["other", other, "viewer"],
  ] as const) {
    const { token } = await createApiToken({
      userId: t.accounts[role].id,
      teamId: t.id,
      name: `export ${key}`,
      expiresAt: null,
    });
    api[key] = bearerFetch(server.url, token);
  }
  vehicleId = await createVehicle("EXP-4");
  emptyVehicleId = await createVehicle("EXP 0/empty");
  // Two analytic run-ups (tests/support/trend-logs.ts), the first with hostile text.
  for (const u of [
    { ...HOSTILE, bytes: trendRunUpCsv({ fnHz: 12 }) },
    {
      fileName: "kestrel-run-up-a.csv",
      notes: "-cmd, 3rd gear, warm oil",
      damperVariant: "A",
      bytes: trendRunUpCsv({ fnHz: 13 }),
    },
  ]) {
    const id = await upload(u.fileName, u.bytes, {
      condition: "run-up",
      gear: "3",
      testDate: "2026-11-18",
      notes: u.notes,
      damperVariant: u.damperVariant,
    });
    uploads.push({ id, ...u });
  }
  // A drive log whose analysis fails (speeds that are not numbers): left out, with its status.
  failedLogId = await upload(
    "not-numbers.csv",
    "time [s],crank speed [rpm],gearbox input speed [rpm]\n0,fast,slow\n0.001,fast,slow\n",
    { condition: "other", damperVariant: "A" },
  );
  streamVehicleId = await createVehicle("EXP-S");
  for (let i = 0; i < 6; i++)
    streamLogIds.push(
      await upload(
        `run-up-${i}.csv`,
        trendRunUpCsv({ fnHz: 12 + 0.3 * i }),
        { condition: "run-up" },
        streamVehicleId,
      ),
    );
  for (const id of [...uploads.map((u) => u.id), ...streamLogIds])
    expect(await settle(id)).toBe("done");
  expect(await settle(failedLogId)).toBe("failed");
}, 240_000);

afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

async function download(path: string) {
  const r = await api.viewer(path);
  const bytes = new Uint8Array(await r.arrayBuffer());
  return { r, bytes, files: r.status === 200 ? unzipSync(bytes) : {} };
}

type Files = Record<string, Uint8Array>;
const jsonOf = <T = Record<string, unknown>>(files: Files, path: string): T => {
  expect(files[path], `${path} is in the pack`).toBeDefined();
  return JSON.parse(strFromU8(files[path]!)) as T;
};
/** The CSV as papaparse reads it: the header row and typed rows (numbers as numbers). */
const csvOf = (files: Files, path: string) => {
  expect(files[path], `${path} is in the pack`).toBeDefined();
  const parsed = Papa.parse<Record<string, unknown>>(strFromU8(files[path]!), {
    delimiter: ",",
    header: true,
    dynamicTyping: true,
    skipEmptyLines: true,
  });
  expect(parsed.errors, path).toEqual([]);
  return { fields: parsed.meta.fields ?? [], rows: parsed.data };
};

describe("the export pack", () => {
  let pack: Awaited<ReturnType<typeof download>>;
  let manifest: Manifest;
  beforeAll(async () => {
    pack = await download(`/api/v1/vehicles/${vehicleId}/export.zip`);
    manifest = jsonOf<Manifest>(pack.files, "manifest.json");
  });

  it("is a zip download with a safe file name that is never cached", () => {
    expect(pack.r.status).toBe(200);
    expect(pack.r.headers.get("content-type")).toBe("application/zip");
    expect(pack.r.headers.get("cache-control")).toBe("no-store");
    const day = String(manifest.generatedAt).slice(0, 10);
    expect(pack.r.headers.get("content-disposition")).toContain(
      `attachment; filename="EXP-4-export-${day}.zip"`,
    );
    // The local file header's signature, PK\x03\x04 (PKWARE APPNOTE.TXT 4.3.7).
    expect([...pack.bytes.slice(0, 4)]).toEqual([0x50, 0x4b, 0x03, 0x04]);
  });

  it("has a manifest whose SHA-256 and sizes match every other file of the zip", () => {
    expect(manifest.format).toBe("twistlog-export/1");
    expect(manifest.software).toMatch(/^twistlog \d+\.\d+\.\d+/);
    expect(manifest.vehicle).toMatchObject({ id: vehicleId, identifier: "EXP-4" });
    const listed = (manifest.files as { path: string; sha256: string; sizeBytes: number }[]).map(
      (f) => f.path,
    );
    expect(listed.sort()).toEqual(
      Object.keys(pack.files)
        .filter((p) => p !== "manifest.json")
        .sort(),
    );
    for (const f of manifest.files as { path: string; sha256: string; sizeBytes: number }[]) {
      expect(f.sha256, f.path).toBe(sha256(pack.files[f.path]!));
      expect(f.sizeBytes, f.path).toBe(pack.files[f.path]!.length);
    }
    // Four files per analysed drive log, and the four top-level files.
    expect(Object.keys(pack.files)).toHaveLength(4 * uploads.length + 4);
  });

  it("lists the analysed drive logs and leaves out the failed one with its status", () => {
    expect(manifest.logs.map((l) => l.logId)).toEqual(uploads.map((u) => u.id));
    expect(manifest.skipped).toEqual([
      expect.objectContaining({
        logId: failedLogId,
        status: "failed",
        fileName: "not-numbers.csv",
      }),
    ]);
    expect(manifest.skipped[0]!.reason).toMatch(/failed/);
  });

  it("vehicle.json is the vehicle as the API gives it", async () => {
    const { vehicle } = (await (await api.viewer(`/api/v1/vehicles/${vehicleId}`)).json()) as {
      vehicle: unknown;
    };
    expect(jsonOf(pack.files, "vehicle.json")).toEqual(vehicle);
  });

  it("result.json is byte for byte the API's result; the CSV files hold its numbers in SI units", async () => {
    for (const u of uploads) {
      const folder = manifest.logs.find((l) => l.logId === u.id)!.folder;
      expect(folder).toMatch(new RegExp(`^logs/${u.id}-[A-Za-z0-9][A-Za-z0-9._-]*$`));
      const answer = await api.viewer(`/api/v1/logs/${u.id}/result`);
      expect(answer.status).toBe(200);
      const text = await answer.text();
      expect(strFromU8(pack.files[`${folder}/result.json`]!)).toBe(text);
      const result = JSON.parse(text) as {
        isolation: { rpm: number; dB: number; blocks: number; aboveNoise: boolean }[];
        orderCurves: {
          order: number;
          points: { rpm: number; crankRpm: number; gearboxRpm: number; blocks: number }[];
        }[];
      };
      expect(jsonOf(pack.files, `${folder}/result.json`)).toEqual(result);
      expect(result.isolation.length).toBeGreaterThan(10);

      const iso = csvOf(pack.files, `${folder}/isolation.csv`);
      expect(iso.fields.slice(0, 4)).toEqual([
        "engine_speed [rad/s]",
        "isolation [dB]",
        "blocks",
        "above_noise",
      ]);
      expect(iso.rows).toHaveLength(result.isolation.length);
      result.isolation.forEach((p, i) => {
        const row = iso.rows[i]!;
        close(row["engine_speed [rad/s]"], p.rpm * RAD_S_PER_RPM, `isolation bin ${i} speed`);
        close(row["isolation [dB]"], p.dB, `isolation bin ${i} dB`);
        expect(row.blocks).toBe(p.blocks);
        expect(row.above_noise).toBe(p.aboveNoise);
      });

      const curves = csvOf(pack.files, `${folder}/order-curves.csv`);
      expect(curves.fields).toEqual([
        "order",
        "engine_speed [rad/s]",
        "crank_amplitude [rad/s]",
        "gearbox_amplitude [rad/s]",
        "blocks",
      ]);
      const points = result.orderCurves.flatMap((c) =>
        c.points.map((p) => ({ order: c.order, ...p })),
      );
      expect(points.length).toBeGreaterThan(result.isolation.length);
      expect(curves.rows).toHaveLength(points.length);
      points.forEach((p, i) => {
        const row = curves.rows[i]!;
        const what = `order ${p.order} at ${p.rpm} rpm`;
        close(row.order, p.order, what);
        close(row["engine_speed [rad/s]"], p.rpm * RAD_S_PER_RPM, what);
        close(row["crank_amplitude [rad/s]"], p.crankRpm * RAD_S_PER_RPM, what);
        close(row["gearbox_amplitude [rad/s]"], p.gearboxRpm * RAD_S_PER_RPM, what);
        expect(row.blocks, what).toBe(p.blocks);
      });
    }
  });

  it("source.json names the raw file by the SHA-256 of the bytes that were uploaded", async () => {
    for (const u of uploads) {
      const log = manifest.logs.find((l) => l.logId === u.id)!;
      const source = jsonOf<Record<string, Record<string, unknown>>>(
        pack.files,
        `${log.folder}/source.json`,
      );
      const { log: row } = (await (await api.viewer(`/api/v1/logs/${u.id}`)).json()) as {
        log: { latestAnalysisId: number; uploadedAt: string };
      };
      expect(source.driveLog).toMatchObject({
        id: u.id,
        fileName: u.fileName,
        sha256: sha256(u.bytes),
        sizeBytes: Buffer.byteLength(u.bytes),
        uploadedAt: row.uploadedAt,
        uploadedBy: team.accounts.engineer.name,
        testDate: "2026-11-18",
        condition: "run-up",
        gear: 3,
        damperVariant: u.damperVariant,
        notes: u.notes,
      });
      expect(source.analysis).toMatchObject({
        id: row.latestAnalysisId,
        version: 1,
        firingOrder: 2,
      });
      expect(source.analysis!.settings).toMatchObject({ revsPerBlock: expect.any(Number) });
      expect(source.source).toMatchObject({ format: "csv", channels: expect.any(Object) });
    }
  });

  it("no CSV cell starts with =, +, @ or - followed by a letter; hostile text is kept behind an apostrophe", () => {
    const csvPaths = Object.keys(pack.files).filter((p) => p.endsWith(".csv"));
    expect(csvPaths).toHaveLength(2 * uploads.length + 1);
    let cells = 0;
    for (const path of csvPaths) {
      const raw = Papa.parse<string[]>(strFromU8(pack.files[path]!), {
        delimiter: ",",
        skipEmptyLines: true,
      });
      expect(raw.errors, path).toEqual([]);
      for (const row of raw.data)
        for (const cell of row) {
          cells++;
          expect(RUNNABLE.test(cell), `${path}: ${JSON.stringify(cell)}`).toBe(false);
        }
    }
    expect(cells).toBeGreaterThan(1000);
    const index = csvOf(pack.files, "logs.csv");
    const hostile = index.rows.find((r) => r.log_id === uploads[0]!.id)!;
    expect(hostile.file_name).toBe(`'${HOSTILE.fileName}`);
    expect(hostile.notes).toBe(`'${HOSTILE.notes}`);
    expect(hostile.damper_variant).toBe(`'${HOSTILE.damperVariant}`);
    const plain = index.rows.find((r) => r.log_id === uploads[1]!.id)!;
    expect(plain).toMatchObject({
      file_name: "kestrel-run-up-a.csv",
      notes: "'-cmd, 3rd gear, warm oil",
      gear: 3,
      analysis_version: 1,
    });
    // The hostile name does not reach the folder name either.
    expect(manifest.logs[0]!.folder).toBe(`logs/${uploads[0]!.id}-SUM-1-cmd`);
  });

  it("has a README with the layout, the units and a pandas example", () => {
    const readme = strFromU8(pack.files["README.md"]!);
    for (const text of ["pd.read_csv", "json.load", "hashlib.sha256", "rad/s", "manifest.json"])
      expect(readme).toContain(text);
    expect(readme).toContain(`${manifest.logs[0]!.folder}/isolation.csv`);
  });
});

describe("choosing and refusing", () => {
  it("?damperVariant= keeps one variant's drive logs", async () => {
    const { r, files } = await download(`/api/v1/vehicles/${vehicleId}/export.zip?damperVariant=A`);
    expect(r.status).toBe(200);
    expect(r.headers.get("content-disposition")).toMatch(/filename="EXP-4-A-export-/);
    const manifest = jsonOf<Manifest>(files, "manifest.json");
    expect(manifest.damperVariant).toBe("A");
    expect(manifest.logs.map((l) => l.logId)).toEqual([uploads[1]!.id]);
    expect(manifest.skipped.map((l) => l.logId)).toEqual([failedLogId]);
  });

  it("answers a variant no drive log has, and a bad query, in the API's error shape", async () => {
    const cases: [string, number, string, RegExp][] = [
      ["?damperVariant=Z", 404, "no_such_variant", /"Z".*"\+B", "A"/],
      ["?damperVariant=", 400, "invalid_export_query", /empty/],
      ["?damperVariant=A&damperVariant=B", 400, "invalid_export_query", /once/],
      [`?damperVariant=${"x".repeat(81)}`, 400, "invalid_export_query", /80/],
      ["?variant=A", 400, "invalid_export_query", /"variant"/],
    ];
    for (const [query, status, code, message] of cases) {
      const r = await api.viewer(`/api/v1/vehicles/${vehicleId}/export.zip${query}`);
      expect(r.status, query).toBe(status);
      const body = (await r.json()) as { error: { code: string; message: string } };
      expect(body.error.code, query).toBe(code);
      expect(body.error.message, query).toMatch(message);
    }
  });

  it("another team's vehicle is not found", async () => {
    const r = await api.other(`/api/v1/vehicles/${vehicleId}/export.zip`);
    expect(r.status).toBe(404);
    expect(((await r.json()) as { error: { code: string } }).error.code).toBe("not_found");
  });

  it("an empty vehicle gives a pack with the vehicle, the manifest and a README that says so", async () => {
    const { r, files } = await download(`/api/v1/vehicles/${emptyVehicleId}/export.zip`);
    expect(r.status).toBe(200);
    expect(r.headers.get("content-disposition")).toMatch(
      /filename="EXP-0-empty-export-\d{4}-\d\d-\d\d\.zip"/,
    );
    expect(Object.keys(files).sort()).toEqual([
      "README.md",
      "logs.csv",
      "manifest.json",
      "vehicle.json",
    ]);
    const manifest = jsonOf<Manifest>(files, "manifest.json");
    expect(manifest).toMatchObject({ logs: [], skipped: [] });
    expect(strFromU8(files["README.md"]!)).toContain("No analysed drive logs");
    expect(csvOf(files, "logs.csv").rows).toEqual([]);
  });
});

describe("streaming", () => {
  const openPack = async () =>
    openExportPack({
      teamId: team.id,
      vehicle: await vehicleData(team.id).vehicle(streamVehicleId),
      vehicleJson: {},
    });

  it("makes the next drive log's files only as the reader takes the zip (back-pressure)", async () => {
    const whole = await openPack();
    let size = 0;
    for await (const chunk of whole.stream) size += (chunk as Buffer).length;
    // Six analysed run-ups: far more than what may wait in the stream below.
    expect(size).toBeGreaterThan(160_000);

    const waiting = await openPack();
    // Nobody reads: the pack must stop once the stream's buffer is full, not fill memory. What
    // may wait is the buffer's high-water mark (16 KiB, Node's default) plus the chunk that
    // filled it (deflate writes at most 16 KiB at a time) and a few headers. The wait only lets
    // the pack run ahead if it would; a slower machine can only make it write less.
    await new Promise((resolve) => setTimeout(resolve, 1500));
    expect(waiting.stream.readableLength).toBeGreaterThan(0);
    expect(waiting.stream.readableLength).toBeLessThan(40_000);
    waiting.stream.destroy();
  });

  it("stops cleanly when the reader goes away halfway", async () => {
    const pack = await openPack();
    let read = 0;
    for await (const chunk of pack.stream) {
      read += (chunk as Buffer).length;
      if (read > 50_000) break; // ends the iteration and destroys the stream
    }
    expect(pack.stream.destroyed).toBe(true);
    // Over HTTP: a client that hangs up after the first bytes; the server goes on answering.
    const before = server.output().length;
    const controller = new AbortController();
    const r = await api.viewer(`/api/v1/vehicles/${vehicleId}/export.zip`, {
      signal: controller.signal,
    });
    const reader = r.body!.getReader();
    expect((await reader.read()).done).toBe(false);
    controller.abort();
    await reader.closed.catch(() => undefined);
    const again = await download(`/api/v1/vehicles/${vehicleId}/export.zip`);
    expect(again.r.status).toBe(200);
    expect(Object.keys(again.files)).toHaveLength(4 * uploads.length + 4);
    expect(server.output().slice(before)).not.toMatch(/export pack|Error/);
  });
});
