/**
 * A bench for the sign-off tests (issue 16) over HTTP: one API token per role of a fresh test
 * team, a four-cylinder four-stroke vehicle made through API v1, analytic idle logs
 * (./analytic-log.ts: 800 rpm, order 2, through a two-mass damper with fn 12 Hz, ζ 0.1) uploaded
 * through API v1 with a damper variant, and the SHA-256 of each file's bytes as sent, computed
 * here (node:crypto) to compare with what the server records. Loads no database module on
 * import, so a test file may import it before choosing its scratch database.
 */
import { createHash } from "node:crypto";
import { analyticIdleCsv, IDLE_800, type AnalyticIdle } from "./analytic-log";
import type { TestTeam } from "./accounts";
import { bearerFetch, type ApiFetch } from "./trend-logs";

export type BenchRole = "admin" | "engineer" | "technician" | "viewer";

/** One ApiFetch per role of the team, each with its own API token. */
export async function apiPerRole(baseUrl: string, team: TestTeam) {
  // Imported here, not on top: a test file picks its scratch database before the app's database
  // client is first loaded (./scratch-db.ts).
  const { createApiToken } = await import("~/lib/data/api-tokens.server");
  const api = {} as Record<BenchRole, ApiFetch>;
  for (const role of ["admin", "engineer", "technician", "viewer"] as const) {
    const { token } = await createApiToken({
      userId: team.accounts[role].id,
      teamId: team.id,
      name: `sign-off ${role}`,
      expiresAt: null,
    });
    api[role] = bearerFetch(baseUrl, token);
  }
  return api;
}

/** A JSON request through an ApiFetch; resolves with the status and the parsed body. */
export async function sendJson<T = Record<string, unknown>>(
  api: ApiFetch,
  method: "POST" | "PATCH" | "DELETE" | "GET",
  path: string,
  body?: unknown,
): Promise<{ status: number; body: T }> {
  const r = await api(path, {
    method,
    headers: body === undefined ? {} : { "Content-Type": "application/json" },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  const text = await r.text();
  return { status: r.status, body: (text ? JSON.parse(text) : null) as T };
}

/** POST /api/v1/vehicles as the given caller: a four-cylinder four-stroke car; its id. */
export async function makeVehicle(api: ApiFetch, identifier: string): Promise<number> {
  const r = await sendJson<{ vehicle: { id: number } }>(api, "POST", "/api/v1/vehicles", {
    name: `Sign-off car ${identifier}`,
    identifier,
    cylinders: 4,
    stroke: 4,
  });
  if (r.status !== 201) throw new Error(`vehicle: ${r.status} ${JSON.stringify(r.body)}`);
  return r.body.vehicle.id;
}

export interface UploadedLog {
  id: number;
  fileName: string;
  /** SHA-256 (hex) of the bytes sent. */
  sha256: string;
}

/**
 * Uploads an analytic idle log (condition idle-neutral) with the damper variant through
 * POST /api/v1/vehicles/:id/logs and waits until it is analysed. `crankAmpRpm` makes files of
 * equal isolation differ in their bytes (the isolation does not depend on the amplitude).
 */
export async function uploadIdle(
  api: ApiFetch,
  vehicleId: number,
  fileName: string,
  damperVariant: string,
  idle: Partial<AnalyticIdle> = {},
): Promise<UploadedLog> {
  const csv = analyticIdleCsv({ ...IDLE_800, durationS: 6, ...idle });
  const form = new FormData();
  form.set("condition", "idle-neutral");
  form.set("damperVariant", damperVariant);
  form.set("file", new Blob([csv], { type: "text/csv" }), fileName);
  const r = await api(`/api/v1/vehicles/${vehicleId}/logs`, { method: "POST", body: form });
  if (r.status !== 202) throw new Error(`upload ${fileName}: ${r.status} ${await r.text()}`);
  const { log } = (await r.json()) as { log: { id: number } };
  await waitForAnalysis(api, log.id);
  return { id: log.id, fileName, sha256: createHash("sha256").update(csv).digest("hex") };
}

/**
 * Waits until the drive log's analysis is done and, when `after` is given, is another analysis
 * than that one (a re-analysis); resolves with the latest analysis id.
 */
export async function waitForAnalysis(
  api: ApiFetch,
  logId: number,
  after?: number | null,
): Promise<number> {
  for (let i = 0; i < 600; i++) {
    const r = await api(`/api/v1/logs/${logId}`);
    const { log } = (await r.json()) as {
      log: { status: string; error: unknown; latestAnalysisId: number | null };
    };
    if (log.status === "failed")
      throw new Error(`drive log ${logId} failed: ${JSON.stringify(log.error)}`);
    if (
      log.status === "done" &&
      log.latestAnalysisId !== null &&
      (after === undefined || log.latestAnalysisId !== after)
    )
      return log.latestAnalysisId;
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
  throw new Error(`drive log ${logId} did not finish`);
}

/** GET a PDF through the API: the status, headers and bytes. */
export async function getPdf(api: ApiFetch, path: string) {
  const r = await api(path);
  return { status: r.status, headers: r.headers, bytes: Buffer.from(await r.arrayBuffer()) };
}

export const sha256Hex = (data: string | Buffer) => createHash("sha256").update(data).digest("hex");
