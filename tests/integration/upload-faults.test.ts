import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { readdir } from "node:fs/promises";
import { connect } from "node:net";
import { join } from "node:path";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";
import { HttpClient } from "../support/http-client";

// A database and storage folder of its own, so the blob store's tmp/ and the drive-log rows
// seen here belong to this file alone.
const testbed = await useJobTestbed("faults");
const { startUploadBed } = await import("../support/upload-bed");
const { pool } = await import("~/lib/infra/db.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");

// Uploads whose connection closes mid-body (a closed tab, a dropped link) against the
// production server: it must keep serving, keep no partial file and record no drive log.

let server: Awaited<ReturnType<typeof startServer>>;
let team: Awaited<ReturnType<typeof createTestTeam>>;
let technicianToken = "";
let vehicleId = 0;

beforeAll(async () => {
  ({ server, team, technicianToken, vehicleId } = await startUploadBed(
    "Faults",
    testbed.serverEnv,
    { name: "Cut-off car", identifier: "K-CUT-1" },
  ));
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

const boundary = "----twistlog-cut-off";
const csvChunk =
  "time [s],crank speed [rpm],gearbox input speed [rpm]\n" + "0.001,800,800\n".repeat(20_000);

/**
 * Sends a multipart upload's head and the first ~280 kB of a file that claims to be 50 MB, waits
 * until the blob store has begun writing it (a file in tmp/), then cuts the connection: `rst`
 * resets it, `fin` closes it politely.
 */
async function cutOffUpload(path: string, headers: Record<string, string>, cut: "rst" | "fin") {
  const url = new URL(server.url);
  const fields = Object.entries({
    csrf: headers["x-csrf"] ?? "",
    intent: "upload",
    condition: "idle-neutral",
  })
    .map(([k, v]) => `--${boundary}\r\nContent-Disposition: form-data; name="${k}"\r\n\r\n${v}\r\n`)
    .join("");
  const head =
    fields +
    `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="cut.csv"\r\n` +
    "Content-Type: text/csv\r\n\r\n";
  const socket = connect(Number(url.port), url.hostname);
  socket.on("error", () => {}); // the server may answer or reset: either is fine here
  await new Promise<void>((resolve) => socket.once("connect", resolve));
  const lines = [
    `POST ${path} HTTP/1.1`,
    `Host: ${url.host}`,
    `Content-Type: multipart/form-data; boundary=${boundary}`,
    `Content-Length: ${50 * 1024 * 1024}`,
    ...Object.entries(headers)
      .filter(([k]) => k !== "x-csrf")
      .map(([k, v]) => `${k}: ${v}`),
  ];
  socket.write(lines.join("\r\n") + "\r\n\r\n" + head + csvChunk);
  const tmp = join(testbed.storage, "tmp");
  await vi.waitFor(async () => expect((await readdir(tmp)).length).toBeGreaterThan(0), {
    timeout: 15_000,
    interval: 20,
  });
  if (cut === "rst") socket.resetAndDestroy();
  else socket.end();
}

async function expectNothingLeft() {
  // The server is still there …
  const health = await fetch(`${server.url}/healthz`);
  expect(health.status).toBe(200);
  // … and removes the partial file once it sees the cut (it may take a moment to notice).
  await vi.waitFor(async () => expect(await readdir(join(testbed.storage, "tmp"))).toEqual([]), {
    timeout: 15_000,
    interval: 50,
  });
  // No blob was kept (only tmp/ is in the store) and no drive log was recorded.
  expect(await readdir(testbed.storage)).toEqual(["tmp"]);
  const [rows] = await pool.query("SELECT COUNT(*) AS n FROM drive_logs WHERE vehicle_id = ?", [
    vehicleId,
  ]);
  expect((rows as { n: number }[])[0]!.n).toBe(0);
  // Still serving after the cleanup, too.
  expect((await fetch(`${server.url}/healthz`)).status).toBe(200);
}

describe("an upload cut off mid-body", { timeout: 60_000 }, () => {
  for (const cut of ["rst", "fin"] as const) {
    it(`API token upload, connection ${cut === "rst" ? "reset" : "closed"}: server keeps serving, nothing left behind`, async () => {
      await cutOffUpload(
        `/api/v1/vehicles/${vehicleId}/logs`,
        { Authorization: `Bearer ${technicianToken}` },
        cut,
      );
      await expectNothingLeft();
    });
  }

  for (const cut of ["rst", "fin"] as const) {
    it(`form upload on the vehicle page, connection ${cut === "rst" ? "reset" : "closed"}: server keeps serving, nothing left behind`, async () => {
      const client = new HttpClient(server.url);
      const signedIn = await client.signIn(team.accounts.technician.email, TEST_PASSWORD);
      expect(signedIn.status).toBe(302);
      const page = await client.get(`/vehicles/${vehicleId}`);
      expect(page.status).toBe(200);
      expect(client.csrf).not.toBe("");
      await cutOffUpload(
        `/vehicles/${vehicleId}`,
        {
          Cookie: client.cookieHeader(),
          Origin: server.url,
          "X-Forwarded-For": client.ip,
          "x-csrf": client.csrf,
        },
        cut,
      );
      await expectNothingLeft();
    });
  }
});
