import { get as httpGet } from "node:http";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// The raw drive log as a download, from the team's page and from a share link (issue 12, build
// 3): always an attachment of type text/csv with nosniff, the bytes exactly as uploaded (formula-
// looking cells included), and a file name that cannot break out of its header, whatever the
// uploader called the file. The header grammar checked here is RFC 6266 §4.1 with RFC 8187
// §3.2.1 for `filename*`, and RFC 9110 §5.6.4 for quoted-string.
const testbed = await useJobTestbed("rawdl");
const { startUploadBed } = await import("../support/upload-bed");
const { pool } = await import("~/lib/infra/db.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
const { HttpClient } = await import("../support/http-client");

let server: Awaited<ReturnType<typeof startServer>>;
let team: Awaited<ReturnType<typeof createTestTeam>>;
let engineerToken = "";
let vehicleId = 0;

beforeAll(async () => {
  ({ server, team, engineerToken, vehicleId } = await startUploadBed("RawFile", testbed.serverEnv, {
    name: "Raw car",
    identifier: "K-RAW-1",
  }));
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

/**
 * Uploads `content` under `fileName`, sent as RFC 8187 `filename*` (which busboy decodes), so
 * the name may hold quotes and line breaks that a plain `filename="…"` could not carry.
 */
async function upload(fileName: string, stored: string, content: string): Promise<number> {
  const boundary = "----twistlog-raw";
  const encoded = [...Buffer.from(fileName, "utf8")]
    .map((b) => `%${b.toString(16).padStart(2, "0")}`)
    .join("");
  const body =
    `--${boundary}\r\nContent-Disposition: form-data; name="condition"\r\n\r\nidle-neutral\r\n` +
    `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename*=UTF-8''${encoded}\r\n` +
    `Content-Type: text/csv\r\n\r\n${content}\r\n--${boundary}--\r\n`;
  const r = await fetch(`${server.url}/api/v1/vehicles/${vehicleId}/logs`, {
    method: "POST",
    headers: {
      Authorization: `Bearer ${engineerToken}`,
      "Content-Type": `multipart/form-data; boundary=${boundary}`,
    },
    body,
  });
  const json = (await r.json()) as { log: { id: number; fileName: string } };
  expect(r.status).toBe(202);
  expect(json.log.fileName).toBe(stored);
  return json.log.id;
}

/** A GET with node:http, which shows the header lines exactly as the server sent them. */
function rawGet(
  url: string,
  headers: Record<string, string> = {},
): Promise<{ status: number; rawHeaders: string[]; body: Buffer }> {
  return new Promise((resolve, reject) => {
    httpGet(url, { headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on("data", (c: Buffer) => chunks.push(c));
      res.on("end", () =>
        resolve({
          status: res.statusCode ?? 0,
          rawHeaders: res.rawHeaders,
          body: Buffer.concat(chunks),
        }),
      );
      res.on("error", reject);
    }).on("error", reject);
  });
}

/** The values of header `name` (case-insensitive) among raw header lines. */
function headerValues(rawHeaders: string[], name: string): string[] {
  const out: string[] = [];
  for (let i = 0; i < rawHeaders.length; i += 2)
    if (rawHeaders[i]!.toLowerCase() === name) out.push(rawHeaders[i + 1]!);
  return out;
}

// RFC 9110 §5.6.2 token, §5.6.4 quoted-string (qdtext without CTLs, quoted-pair).
const TOKEN = "[!#$%&'*+.^_`|~0-9A-Za-z-]+";
const QUOTED = '"(?:[\\t !#-\\[\\]-~]|\\\\[\\t -~])*"';
// RFC 8187 §3.2.1: ext-value = charset "'" [ language ] "'" value-chars.
const EXT_VALUE = /^UTF-8'[A-Za-z0-9-]*'((?:%[0-9A-Fa-f]{2}|[A-Za-z0-9!#$&+\-.^_`|~])*)$/;

/**
 * Parses a Content-Disposition value by RFC 6266 §4.1 (type, then `; name=value` parameters),
 * failing on anything outside that grammar; returns the type and the parameters.
 */
function parseDisposition(value: string): { type: string; params: Map<string, string> } {
  const param = new RegExp(`^\\s*;\\s*(${TOKEN})\\s*=\\s*(${TOKEN}|${QUOTED})`);
  const type = new RegExp(`^${TOKEN}`).exec(value);
  expect(type, value).not.toBeNull();
  let rest = value.slice(type![0].length);
  const params = new Map<string, string>();
  while (rest.trim() !== "") {
    const m = param.exec(rest);
    expect(m, `not a parameter: ${rest}`).not.toBeNull();
    const name = m![1]!.toLowerCase();
    expect(params.has(name), `${name} twice`).toBe(false);
    const raw = m![2]!;
    params.set(name, raw.startsWith('"') ? raw.slice(1, -1).replace(/\\(.)/g, "$1") : raw);
    rest = rest.slice(m![0].length);
  }
  return { type: type![0].toLowerCase(), params };
}

/** Checks a raw-file answer: headers, name and the exact bytes. */
function expectRawFile(
  res: { status: number; rawHeaders: string[]; body: Buffer },
  stored: string,
  content: string,
) {
  expect(res.status).toBe(200);
  expect(headerValues(res.rawHeaders, "content-type")).toEqual(["text/csv; charset=utf-8"]);
  expect(headerValues(res.rawHeaders, "x-content-type-options")).toEqual(["nosniff"]);
  // Nothing from the name became a header line of its own.
  expect(headerValues(res.rawHeaders, "set-cookie").join("\n")).not.toContain("x=1");
  expect(headerValues(res.rawHeaders, "x-injected")).toEqual([]);
  const dispositions = headerValues(res.rawHeaders, "content-disposition");
  expect(dispositions).toHaveLength(1);
  const { type, params } = parseDisposition(dispositions[0]!);
  expect(type).toBe("attachment");
  expect([...params.keys()].sort()).toEqual(["filename", "filename*"]);
  // The fallback: printable ASCII without quotes, backslashes or path separators (RFC 6266 §4.3).
  expect(params.get("filename")).toMatch(/^[ !#-.0-[\]-~]+$/);
  // The exact name, percent-decoded as UTF-8 (ECMA-262 decodeURIComponent).
  const ext = EXT_VALUE.exec(params.get("filename*")!);
  expect(ext, params.get("filename*")).not.toBeNull();
  expect(decodeURIComponent(ext![1]!)).toBe(stored);
  // The bytes exactly as uploaded: Twistlog neither escapes nor strips formula-looking cells.
  expect(res.body.toString("utf8")).toBe(content);
}

const HEADER = "time [s],crank speed [rpm],gearbox input speed [rpm],note";
// Names as sent, and as kept: busboy (preservePath off, its default) keeps only the last part
// of a name with a path.
const names = [
  [
    'a"b\r\nSet-Cookie: x=1\r\nX-Injected: yes.csv',
    'a"b\r\nSet-Cookie: x=1\r\nX-Injected: yes.csv',
  ],
  ['"; filename="evil.exe"; x=".csv', '"; filename="evil.exe"; x=".csv'],
  ["Kestrel Ölwanne 测试 ✓ (run 1)'s *best*.csv", "Kestrel Ölwanne 测试 ✓ (run 1)'s *best*.csv"],
  ["..\\..\\windows\\evil.csv", "evil.csv"],
] as const;

describe("the raw file download", { timeout: 60_000 }, () => {
  names.forEach(([fileName, stored], i) => {
    it(`is an attachment with nosniff and a safe name: ${JSON.stringify(fileName)}`, async () => {
      // Formula-looking cells (OWASP "CSV Injection") in a column the analysis does not read.
      const content =
        `${HEADER}\n0.000,800,800,"=cmd|' /C calc'!A0"\n0.001,801,800,@SUM(1+1)\n` +
        `0.002,802,800,+1+1\n0.003,803,800,-2+3\n0.004,804,800,${i}\n`;
      const logId = await upload(fileName, stored, content);

      // The team's page: a viewer downloads it with the session cookie.
      const viewer = new HttpClient(server.url);
      expect((await viewer.signIn(team.accounts.viewer.email, TEST_PASSWORD)).status).toBe(302);
      const cookie = viewer.cookieHeader();
      const page = await rawGet(`${server.url}/vehicles/${vehicleId}/logs/${logId}/file`, {
        Cookie: cookie,
        "X-Forwarded-For": viewer.ip,
      });
      expectRawFile(page, stored, content);

      // A share link that allows the raw file: the same headers and bytes, without an account.
      const made = await fetch(`${server.url}/api/v1/logs/${logId}/shares`, {
        method: "POST",
        headers: { Authorization: `Bearer ${engineerToken}`, "Content-Type": "application/json" },
        body: JSON.stringify({ allowRawDownload: true }),
      });
      expect(made.status).toBe(201);
      const { share } = (await made.json()) as { share: { url: string } };
      const path = new URL(share.url).pathname;
      expectRawFile(await rawGet(`${server.url}${path}/file`), stored, content);
    });
  });
});
