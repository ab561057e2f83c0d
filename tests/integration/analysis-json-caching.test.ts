import { eq } from "drizzle-orm";
import { Readable } from "node:stream";
import { brotliDecompressSync, gunzipSync } from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { useJobTestbed } from "../support/scratch-db";

// The analysis-derived JSON (charts.json of a drive log and of a share link, the API's result)
// against the real MariaDB, with a drive log analysed by the real job runner: one packed body
// per analysis version with a strong ETag, 304 for If-None-Match (RFC 9110 §13.1.2, §15.4.5),
// gzip and br codings that decode to the identity bytes (RFC 9110 §8.4; node:zlib decodes),
// Vary: Accept-Encoding (§12.5.5), and the access checks before any of it: a signed-out, other-
// team or revoked caller gets the refusal it got before, whatever If-None-Match it sends.

const testbed = await useJobTestbed("analysis_json");
process.env.TWISTLOG_STORAGE_DIR = testbed.storage;

const { db, pool } = await import("~/lib/infra/db.server");
const { sessions } = await import("~/lib/infra/db/schema");
const { driveLogs } = await import("~/lib/infra/db/schema-drive-logs");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { recordDriveLog } = await import("~/lib/data/drive-log-intake.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { blobStore } = await import("~/lib/infra/storage-settings.server");
const { startAnalysisService } = await import("~/lib/analyses/analysis-service.server");
const { queueAnalysis } = await import("~/lib/analyses/requests.server");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { createTestTeam } = await import("../support/accounts");
const { apiRequest, context, directClient, run, ORIGIN } =
  await import("../support/direct-requests");
const driveLogCharts = await import("~/routes/drive-log.charts");
const shareCharts = await import("~/routes/share.charts");
const logResult = await import("~/routes/api.v1.log-result");
const logShares = await import("~/routes/api.v1.log-shares");
const apiShare = await import("~/routes/api.v1.share");

type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;
let team: TestTeam;
let other: TestTeam;
let service: ReturnType<typeof startAnalysisService>;
let vehicleId = 0;
let logId = 0;
let viewerToken = "";
let otherToken = "";

async function latestAnalysisId(): Promise<number | null> {
  const [row] = await db
    .select({ latest: driveLogs.latestAnalysisId, status: driveLogs.status })
    .from(driveLogs)
    .where(eq(driveLogs.id, logId));
  if (row?.status === "failed") throw new Error("the test drive log failed");
  return row?.status === "done" ? row.latest : null;
}

async function waitForAnalysis(not: number | null = null): Promise<number> {
  for (let i = 0; i < 600; i++) {
    const id = await latestAnalysisId();
    if (id !== null && id !== not) return id;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("the analysis did not finish");
}

beforeAll(async () => {
  [team, other] = await Promise.all([createTestTeam("Etag"), createTestTeam("Elsewhere")]);
  const data = vehicleData(team.id);
  vehicleId = await data.create(
    vehicleSchema.parse({ name: "Etag car", identifier: "ETG-1", cylinders: 4, stroke: 4 }),
  );
  const stored = await blobStore().put(
    Readable.from([Buffer.from(analyticIdleCsv({ ...IDLE_800, durationS: 6 }))]),
  );
  ({ id: logId } = await recordDriveLog(team.id, {
    vehicle: await data.vehicle(vehicleId),
    fileName: "etag-idle-800.csv",
    stored,
    metadata: { condition: "idle-neutral", gear: 0, notes: "", testDate: "2026-11-03" },
    uploadedBy: team.accounts.technician.id,
  }));
  service = startAnalysisService();
  await waitForAnalysis();
  const token = (userId: number, teamId: number) =>
    createApiToken({ userId, teamId, name: "etag", expiresAt: null }).then((t) => t.token);
  viewerToken = await token(team.accounts.viewer.id, team.id);
  otherToken = await token(other.accounts.admin.id, other.id);
}, 120_000);

afterAll(async () => {
  await service?.stop();
  await pool.end();
  await testbed.close();
});

const chartsPath = () => `/vehicles/${vehicleId}/logs/${logId}/charts.json`;
const params = () => ({ vehicleId: String(vehicleId), logId: String(logId) });

function charts(request: Request) {
  return run(() => driveLogCharts.loader({ request, params: params(), context } as never));
}

function result(request: Request) {
  return run(() =>
    logResult.loader({ request, params: { logId: String(logId) }, context } as never),
  );
}

const bytes = async (r: Response) => Buffer.from(await r.arrayBuffer());

describe("charts.json: one packed body per analysis version", () => {
  it("has a strong ETag that stays for one version and changes with a new one", async () => {
    const viewer = await directClient({ id: team.accounts.viewer.id, teamId: team.id });
    const first = await charts(viewer.get(chartsPath()));
    expect(first.status).toBe(200);
    const etag = first.headers.get("ETag")!;
    // A strong validator (RFC 9110 §8.8.3): quoted, no W/ prefix.
    expect(etag).toMatch(/^"[A-Za-z0-9_-]+"$/);
    expect(first.headers.get("Vary")).toBe("Accept-Encoding");
    expect(first.headers.get("Cache-Control")).toBe("private, no-cache");
    const body = (await first.json()) as { analysis: { id: number; version: number } };
    const again = await charts(viewer.get(chartsPath()));
    expect(again.headers.get("ETag")).toBe(etag);

    // A re-analysis is a new version: a new body, so a new tag, and the old tag is not current.
    const before = body.analysis.id;
    await queueAnalysis(await vehicleData(team.id).reanalysisJob(logId));
    const after = await waitForAnalysis(before);
    const next = await charts(viewer.get(chartsPath(), { "If-None-Match": etag }));
    expect(next.status).toBe(200);
    expect(next.headers.get("ETag")).not.toBe(etag);
    const nextBody = (await next.json()) as { analysis: { id: number; version: number } };
    expect(nextBody.analysis).toMatchObject({ id: after, version: body.analysis.version + 1 });
    // The earlier version keeps its own tag (?analysis=<id>).
    const earlier = await charts(viewer.get(`${chartsPath()}?analysis=${before}`));
    expect(earlier.headers.get("ETag")).toBe(etag);
  });

  it("If-None-Match with the current tag answers 304 with no body and the 200's validators", async () => {
    const viewer = await directClient({ id: team.accounts.viewer.id, teamId: team.id });
    const first = await charts(viewer.get(chartsPath(), { "Accept-Encoding": "gzip" }));
    const etag = first.headers.get("ETag")!;
    // Weak comparison (RFC 9110 §13.1.2): the tag with W/ in front matches too.
    for (const sent of [etag, `W/${etag}`, `"other", ${etag}`]) {
      const r = await charts(
        viewer.get(chartsPath(), { "Accept-Encoding": "gzip", "If-None-Match": sent }),
      );
      // RFC 9110 §15.4.5: 304 has no content and carries ETag, Vary and Cache-Control.
      expect(r.status).toBe(304);
      expect(r.body).toBeNull();
      expect(r.headers.get("ETag")).toBe(etag);
      expect(r.headers.get("Vary")).toBe("Accept-Encoding");
      expect(r.headers.get("Cache-Control")).toBe("private, no-cache");
    }
    const stale = await charts(viewer.get(chartsPath(), { "If-None-Match": '"not-this-one"' }));
    expect(stale.status).toBe(200);
  });

  it("gzip and br bodies decode with node:zlib to exactly the identity body", async () => {
    const viewer = await directClient({ id: team.accounts.viewer.id, teamId: team.id });
    const plain = await charts(viewer.get(chartsPath(), { "Accept-Encoding": "identity" }));
    expect(plain.headers.get("Content-Encoding")).toBeNull();
    const identity = await bytes(plain);
    expect(JSON.parse(identity.toString("utf8"))).toHaveProperty("charts");
    const gz = await charts(viewer.get(chartsPath(), { "Accept-Encoding": "gzip" }));
    expect(gz.headers.get("Content-Encoding")).toBe("gzip");
    expect(gunzipSync(await bytes(gz)).equals(identity)).toBe(true);
    const br = await charts(viewer.get(chartsPath(), { "Accept-Encoding": "gzip, br" }));
    expect(br.headers.get("Content-Encoding")).toBe("br");
    expect(brotliDecompressSync(await bytes(br)).equals(identity)).toBe(true);
    // Three representations, three strong tags (RFC 9110 §8.8.3).
    const tags = [plain, gz, br].map((r) => r.headers.get("ETag"));
    expect(new Set(tags).size).toBe(3);
    for (const r of [plain, gz, br]) expect(r.headers.get("Vary")).toBe("Accept-Encoding");
  });

  it("a signed-out, other-team or signed-off caller gets the same refusal with a valid tag", async () => {
    const viewer = await directClient({ id: team.accounts.viewer.id, teamId: team.id });
    const etag = (await charts(viewer.get(chartsPath()))).headers.get("ETag")!;
    const outsider = await directClient({ id: other.accounts.admin.id, teamId: other.id });
    const nobody = await directClient(null);
    for (const client of [nobody, outsider]) {
      const plain = await charts(client.get(chartsPath()));
      const withTag = await charts(client.get(chartsPath(), { "If-None-Match": etag }));
      // Signed out: to sign-in (302); another team's drive log does not exist for it (404).
      expect([302, 404]).toContain(plain.status);
      expect(withTag.status).toBe(plain.status);
      expect(withTag.headers.get("Location")).toBe(plain.headers.get("Location"));
      expect(withTag.headers.get("ETag")).toBeNull();
    }
    // An expired session (30 days after sign-in) is refused like no session.
    const expiring = await directClient({ id: team.accounts.viewer.id, teamId: team.id });
    expect((await charts(expiring.get(chartsPath()))).status).toBe(200);
    await db
      .update(sessions)
      .set({ expiresAt: new Date(Date.now() - 1_000) })
      .where(eq(sessions.userId, team.accounts.viewer.id));
    const expired = await charts(expiring.get(chartsPath(), { "If-None-Match": etag }));
    expect(expired.status).toBe(302);
    // A session ended (signed out elsewhere, revoked on the account page) is refused at once.
    const leaving = await directClient({ id: team.accounts.viewer.id, teamId: team.id });
    expect((await charts(leaving.get(chartsPath()))).status).toBe(200);
    await db.delete(sessions).where(eq(sessions.userId, team.accounts.viewer.id));
    const gone = await charts(leaving.get(chartsPath(), { "If-None-Match": etag }));
    expect(gone.status).toBe(302);
    expect(gone.headers.get("Location")).toMatch(/^\/sign-in\?redirectTo=/);
  });
});

describe("the share link's charts.json", () => {
  it("is refused with 410 at once after revocation, also with If-None-Match", async () => {
    // Engineers make share links (docs/architecture.md).
    const engineerToken = (
      await createApiToken({
        userId: team.accounts.engineer.id,
        teamId: team.id,
        name: "share",
        expiresAt: null,
      })
    ).token;
    const made = await run(() =>
      logShares.action({
        request: apiRequest(`/api/v1/logs/${logId}/shares`, engineerToken, {
          method: "POST",
          json: {},
        }),
        params: { logId: String(logId) },
        context,
      } as never),
    );
    expect(made.status).toBe(201);
    const { share } = (await made.json()) as { share: { id: number; url: string } };
    const token = share.url.split("/s/")[1]!;
    const shared = (headers: Record<string, string> = {}) =>
      run(() =>
        shareCharts.loader({
          request: new Request(`${ORIGIN}/s/${token}/charts.json`, { headers }),
          params: { token },
          context,
        } as never),
      );
    const first = await shared({ "Accept-Encoding": "br" });
    expect(first.status).toBe(200);
    const etag = first.headers.get("ETag")!;
    expect(first.headers.get("Cache-Control")).toBe("no-store");
    expect((await shared({ "Accept-Encoding": "br", "If-None-Match": etag })).status).toBe(304);

    const revoked = await run(() =>
      apiShare.action({
        request: apiRequest(`/api/v1/shares/${share.id}`, engineerToken, { method: "DELETE" }),
        params: { shareId: String(share.id) },
        context,
      } as never),
    );
    expect(revoked.status).toBe(200);
    const after = await shared({ "Accept-Encoding": "br", "If-None-Match": etag });
    // RFC 9110 §15.5.11: 410 Gone, with no data of the drive log.
    expect(after.status).toBe(410);
    expect(after.headers.get("ETag")).toBeNull();
    expect(await after.text()).not.toContain("charts");
  });
});

describe("the API's result JSON", () => {
  it("is packed like charts.json: the stored JSON, its codings, ETag and 304", async () => {
    const plain = await result(apiRequest(`/api/v1/logs/${logId}/result`, viewerToken));
    expect(plain.status).toBe(200);
    const identity = await bytes(plain);
    // The same document the data layer decodes from the stored columns.
    const stored = await vehicleData(team.id).latestResult(logId);
    expect(JSON.parse(identity.toString("utf8"))).toEqual(stored);
    const etag = plain.headers.get("ETag")!;
    expect(etag).toMatch(/^"[A-Za-z0-9_-]+"$/);
    expect(plain.headers.get("Vary")).toBe("Accept-Encoding");

    const gzRequest = apiRequest(`/api/v1/logs/${logId}/result`, viewerToken);
    gzRequest.headers.set("Accept-Encoding", "gzip");
    const gz = await result(gzRequest);
    expect(gunzipSync(await bytes(gz)).equals(identity)).toBe(true);

    const conditional = apiRequest(`/api/v1/logs/${logId}/result`, viewerToken);
    conditional.headers.set("If-None-Match", etag);
    const notModified = await result(conditional);
    expect(notModified.status).toBe(304);
    expect(notModified.body).toBeNull();

    // Another team's token: 404 not_found, as before, even with the valid tag.
    const outsider = apiRequest(`/api/v1/logs/${logId}/result`, otherToken);
    outsider.headers.set("If-None-Match", etag);
    const refused = await result(outsider);
    expect(refused.status).toBe(404);
    expect(((await refused.json()) as { error: { code: string } }).error.code).toBe("not_found");
  });
});
