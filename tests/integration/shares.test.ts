import { and, eq, sql } from "drizzle-orm";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, IDLE_800, type AnalyticIdle } from "../support/analytic-log";
import { freePort } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// Share links, e-mail and comments (issue 7) against the real MariaDB: the data layer and the
// route modules called directly with real sessions, CSRF cookies and API tokens. Drive logs are
// analysed by the real job runner and worker pool on a database of this file's own.

const mailDir = await mkdtemp(join(tmpdir(), "twistlog-share-mail-"));
process.env.MAIL_DIR = mailDir;
process.env.FAKE_SMTP_PORT = String(await freePort());
const testbed = await useJobTestbed("shares");
process.env.TWISTLOG_STORAGE_DIR = testbed.storage;

const { db, pool } = await import("~/lib/infra/db.server");
const { auditEvents } = await import("~/lib/infra/db/schema");
const { shares, shareViews, comments } = await import("~/lib/infra/db/schema-results");
const { driveLogs } = await import("~/lib/infra/db/schema-drive-logs");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { recordDriveLog } = await import("~/lib/data/drive-log-intake.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { blobStore } = await import("~/lib/infra/storage-settings.server");
const { startAnalysisService } = await import("~/lib/analyses/analysis-service.server");
const { startFakeSmtp, readStoredMail } = await import("~/lib/infra/fake-smtp.server");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { sha256Hex } = await import("~/lib/infra/secrets.server");
const shareLib = await import("~/lib/data/shares.server");
const sharePage = await import("~/lib/http/share-link.server");
const { createTestTeam } = await import("../support/accounts");
const { apiRequest, context, directClient, run } = await import("../support/direct-requests");
const shareCharts = await import("~/routes/share.charts");
const shareCurves = await import("~/routes/share.curves");
const shareFile = await import("~/routes/share.file");
const logShare = await import("~/routes/drive-log.share");
const comparisonShare = await import("~/routes/comparison.share");
const apiLogShares = await import("~/routes/api.v1.log-shares");
const apiShares = await import("~/routes/api.v1.shares");
const apiShare = await import("~/routes/api.v1.share");
const driveLogCharts = await import("~/routes/drive-log.charts");
const commentsRoute = await import("~/routes/comments");
type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;

let team: TestTeam;
let other: TestTeam;
let service: ReturnType<typeof startAnalysisService>;
let smtp: Awaited<ReturnType<typeof startFakeSmtp>>;
let vehicleId: number;
/** Two analysed drive logs (800 and 1500 rpm idle) and a third one that is never shared. */
const logs = { a: 0, b: 0, unshared: 0 };
const tokens: Record<"admin" | "engineer" | "technician" | "viewer" | "engineer2", string> = {
  admin: "",
  engineer: "",
  technician: "",
  viewer: "",
  engineer2: "",
};
let engineer2: { id: number };

const at1500: AnalyticIdle = { ...IDLE_800, rpm: 1500, durationS: 6 };
const at800: AnalyticIdle = { ...IDLE_800, durationS: 6 };

async function addLog(csv: string, fileName: string) {
  const data = vehicleData(team.id);
  const stored = await blobStore().put(Readable.from([Buffer.from(csv)]));
  const { id } = await recordDriveLog(team.id, {
    vehicle: await data.vehicle(vehicleId),
    fileName,
    stored,
    metadata: { condition: "idle-neutral", gear: 0, notes: "", testDate: "2026-11-03" },
    uploadedBy: team.accounts.technician.id,
  });
  return id;
}

async function waitForDone(ids: number[]) {
  for (let i = 0; i < 600; i++) {
    const rows = await db.select({ id: driveLogs.id, status: driveLogs.status }).from(driveLogs);
    const mine = rows.filter((r) => ids.includes(r.id));
    if (mine.every((r) => r.status === "done")) return;
    if (mine.some((r) => r.status === "failed")) throw new Error("a test drive log failed");
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error("drive logs did not finish");
}

beforeAll(async () => {
  smtp = await startFakeSmtp({ port: Number(process.env.FAKE_SMTP_PORT), dir: mailDir });
  [team, other] = await Promise.all([createTestTeam("Share"), createTestTeam("Elsewhere")]);
  vehicleId = await vehicleData(team.id).create(
    vehicleSchema.parse({ name: "Share car", identifier: "SHR-1", cylinders: 4, stroke: 4 }),
  );
  logs.a = await addLog(analyticIdleCsv(at800), "share-idle-800.csv");
  logs.b = await addLog(analyticIdleCsv(at1500), "share-idle-1500.csv");
  logs.unshared = await addLog(analyticIdleCsv({ ...at800, crankAmpRpm: 7 }), "never-shared.csv");
  service = startAnalysisService();
  await waitForDone([logs.a, logs.b, logs.unshared]);
  // A second engineer of the same team, to check that engineers manage only their own links.
  const { users, memberships } = await import("~/lib/infra/db/schema");
  const [u] = await db
    .insert(users)
    .values({ email: `second-${team.id}@example.test`, name: "Second Engineer", passwordHash: "x" })
    .$returningId();
  await db.insert(memberships).values({ teamId: team.id, userId: u!.id, role: "engineer" });
  engineer2 = { id: u!.id };
  for (const role of ["admin", "engineer", "technician", "viewer"] as const) {
    tokens[role] = (
      await createApiToken({
        userId: team.accounts[role].id,
        teamId: team.id,
        name: role,
        expiresAt: null,
      })
    ).token;
  }
  tokens.engineer2 = (
    await createApiToken({ userId: u!.id, teamId: team.id, name: "e2", expiresAt: null })
  ).token;
}, 120_000);

afterAll(async () => {
  await service?.stop();
  await smtp?.close();
  await pool.end();
  await testbed.close();
  await rm(mailDir, { recursive: true, force: true });
});

const as = (role: "admin" | "engineer" | "technician" | "viewer") =>
  directClient({ id: team.accounts[role].id, teamId: team.id });

async function apiCreate(logId: number, json: unknown, token = tokens.engineer) {
  const request = apiRequest(`/api/v1/logs/${logId}/shares`, token, { method: "POST", json });
  return run(() =>
    apiLogShares.action({ request, params: { logId: String(logId) }, context } as never),
  );
}

async function createdToken(logId = logs.a, json: unknown = {}) {
  const r = await apiCreate(logId, json);
  expect(r.status).toBe(201);
  const { share } = (await r.json()) as { share: { id: number; url: string; expiresAt: string } };
  return { ...share, token: share.url.split("/s/")[1]! };
}

function chartsFor(token: string, query = "") {
  const request = new Request(`http://127.0.0.1:3999/s/${token}/charts.json${query}`);
  return run(() => shareCharts.loader({ request, params: { token }, context } as never));
}

describe("share links: tokens and the shared page", () => {
  it("a token has 256 random bits in base64url and only its sha256 is stored", async () => {
    const made = await createdToken();
    // RFC 4086 §8 and NIST SP 800-63B §5.1.1.2: at least 128 bits of entropy for an unguessable
    // secret. 32 bytes of base64url are 43 characters of 6 bits = 256 bits (RFC 4648 §5).
    expect(made.token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(Buffer.from(made.token, "base64url").length).toBe(32);
    const [row] = await db.select().from(shares).where(eq(shares.id, made.id));
    expect(row!.tokenHash).toBe(sha256Hex(made.token));
    expect(JSON.stringify(row)).not.toContain(made.token);
    // Two links never share a token (a collision of 256-bit values has probability ~2⁻²⁵⁶).
    const again = await createdToken();
    expect(again.token).not.toBe(made.token);
  });

  it("an active link gives the page's data and its own chart JSON, without any session", async () => {
    const made = await createdToken(logs.a, { note: "Look at the idle, please." });
    const active = await sharePage.requireShareForPage(made.token);
    const page = await sharePage.sharedPageData(active);
    expect(page).toMatchObject({
      kind: "log",
      sharedBy: team.accounts.engineer.name,
      teamName: team.name,
      note: "Look at the idle, please.",
      vehicle: { name: "Share car", identifier: "SHR-1", firingOrder: 2 },
    });
    expect(page.logs.map((l) => l.fileName)).toEqual(["share-idle-800.csv"]);
    expect(page.logs[0]!.summary?.firingOrder).toBe(2);

    const charts = await chartsFor(made.token);
    expect(charts.status).toBe(200);
    const body = (await charts.json()) as { logId: number; charts: { firingOrder: number } };
    expect(body.logId).toBe(logs.a);
    // Four-stroke, four cylinders: firing order z/2 = 2 (common practice).
    expect(body.charts.firingOrder).toBe(2);
    // Share answers are kept out of caches, Referer headers and search engines.
    expect(charts.headers.get("Cache-Control")).toBe("no-store");
    expect(charts.headers.get("Referrer-Policy")).toBe("no-referrer");
    expect(charts.headers.get("X-Robots-Tag")).toContain("noindex");
  });

  it("a revoked link and an expired link are 410 in the page and the JSON, with no data", async () => {
    const revoked = await createdToken();
    const del = await run(() =>
      apiShare.action({
        request: apiRequest(`/api/v1/shares/${revoked.id}`, tokens.engineer, { method: "DELETE" }),
        params: { shareId: String(revoked.id) },
        context,
      } as never),
    );
    expect(del.status).toBe(200);
    const expired = await createdToken();
    await db
      .update(shares)
      .set({ expiresAt: new Date(Date.now() - 60_000) })
      .where(eq(shares.id, expired.id));

    for (const token of [revoked.token, expired.token]) {
      // RFC 9110 §15.5.11: 410 Gone — the target existed and is no longer available, for good.
      const pageAnswer = await run(() => sharePage.requireShareForPage(token));
      expect(pageAnswer.status).toBe(410);
      const text = await pageAnswer.text();
      expect(text).toBe("This link is no longer available.");
      expect(pageAnswer.headers.get("Cache-Control")).toBe("no-store");
      for (const answer of [
        await chartsFor(token),
        await run(() =>
          shareCurves.loader({
            request: new Request(`http://127.0.0.1:3999/s/${token}/curves.json`),
            params: { token },
            context,
          } as never),
        ),
      ]) {
        expect(answer.status).toBe(410);
        const json = await answer.text();
        expect(JSON.parse(json)).toEqual({
          error: { code: "share_unavailable", message: "This link is no longer available." },
        });
        expect(json).not.toContain("share-idle-800.csv");
        expect(json).not.toContain("isolation");
      }
    }
  });

  it("a guessed or altered token is 404 (no such link), never 410", async () => {
    const made = await createdToken();
    const last = made.token.at(-1) === "A" ? "B" : "A";
    const altered = made.token.slice(0, -1) + last;
    const guessed = Buffer.alloc(32, 7).toString("base64url");
    // RFC 9110 §15.5.5: 404 — no current representation for the target; it does not say whether
    // one ever existed, so an unknown token learns nothing.
    for (const token of [altered, guessed, "short", made.token + "x"]) {
      expect((await run(() => sharePage.requireShareForPage(token))).status).toBe(404);
      const answer = await chartsFor(token);
      expect(answer.status).toBe(404);
      expect(((await answer.json()) as { error: { code: string } }).error.code).toBe("not_found");
    }
  });

  it("a share link reaches no other drive log's JSON; the signed-in JSON needs a session", async () => {
    const made = await createdToken(logs.a);
    for (const id of [logs.b, logs.unshared]) {
      const answer = await chartsFor(made.token, `?log=${id}`);
      expect(answer.status).toBe(404);
      expect(await answer.text()).not.toContain("never-shared.csv");
    }
    expect((await chartsFor(made.token, "?log=abc")).status).toBe(404);
    const file = await run(() =>
      shareFile.loader({
        request: new Request(`http://127.0.0.1:3999/s/${made.token}/file`),
        params: { token: made.token },
        context,
      } as never),
    );
    // The sharer did not allow the raw file.
    expect(file.status).toBe(403);

    // The team's own chart JSON without a session: a page GET is sent to the sign-in.
    const guest = await directClient(null);
    const path = `/vehicles/${vehicleId}/logs/${logs.unshared}/charts.json`;
    const signedOut = await run(() =>
      driveLogCharts.loader({
        request: guest.get(path),
        params: { vehicleId: String(vehicleId), logId: String(logs.unshared) },
        context,
      } as never),
    );
    expect(signedOut.status).toBe(302);
    expect(signedOut.headers.get("Location")).toMatch(/^\/sign-in\?redirectTo=/);

    // A comparison share: curves of its own logs only.
    const engineer = await as("engineer");
    const cmp = await run(() =>
      comparisonShare.action({
        request: engineer.post(`/vehicles/${vehicleId}/compare/share`, {
          intent: "create",
          logs: `${logs.a},${logs.b}`,
          expiresInDays: "3",
        }),
        params: { vehicleId: String(vehicleId) },
        context,
      } as never),
    );
    expect(cmp.status).toBe(201);
    const token = ((await cmp.json()) as { created: { url: string } }).created.url.split("/s/")[1]!;
    const curves = (q: string) =>
      run(() =>
        shareCurves.loader({
          request: new Request(`http://127.0.0.1:3999/s/${token}/curves.json${q}`),
          params: { token },
          context,
        } as never),
      );
    const all = await curves("");
    expect(all.status).toBe(200);
    const body = (await all.json()) as { curves: { logId: number }[] };
    expect(body.curves.map((c) => c.logId)).toEqual([logs.a, logs.b]);
    expect((await curves(`?logs=${logs.b}`)).status).toBe(200);
    expect((await curves(`?logs=${logs.a},${logs.unshared}`)).status).toBe(404);
    expect((await chartsFor(token, `?log=${logs.b}`)).status).toBe(200);
    expect((await chartsFor(token, `?log=${logs.unshared}`)).status).toBe(404);
    // The comparison page's data: both logs, the band comparison of their isolation curves.
    const page = await sharePage.sharedPageData(await sharePage.requireShareForPage(token));
    expect(page.kind).toBe("comparison");
    expect(page.logs.map((l) => l.id)).toEqual([logs.a, logs.b]);
    expect(page.comparison?.logs.map((l) => l.id)).toEqual([logs.a, logs.b]);
  });

  it("each view adds a share_views row with the time only and counts up", async () => {
    const made = await createdToken();
    await shareLib.countShareView(made.id);
    await shareLib.countShareView(made.id);
    const [row] = await db.select().from(shares).where(eq(shares.id, made.id));
    expect(row!.viewCount).toBe(2);
    expect(row!.lastViewedAt).not.toBeNull();
    const views = await db.select().from(shareViews).where(eq(shareViews.shareId, made.id));
    expect(views).toHaveLength(2);
    // No personal data (GDPR art. 4(1): an IP address or a browser fingerprint would be): the
    // table has the id, the link and the time, nothing else.
    const [columns] = (await db.execute(
      sql`SELECT column_name AS name FROM information_schema.columns WHERE table_schema = DATABASE() AND table_name = 'share_views' ORDER BY ordinal_position`,
    )) as unknown as [{ name: string }[]];
    expect(columns.map((c) => c.name).sort()).toEqual(["id", "share_id", "viewed_at"]);
  });

  it("one link opened by eight browsers at once counts eight views, none refused", async () => {
    // Found by the authorization matrix: concurrent views of one link deadlocked (InnoDB takes
    // a shared lock for the foreign key check, then each wanted the exclusive one).
    const made = await createdToken();
    const settled = await Promise.allSettled(
      Array.from({ length: 8 }, () => shareLib.countShareView(made.id)),
    );
    expect(settled.filter((s) => s.status === "rejected")).toEqual([]);
    const [row] = await db.select().from(shares).where(eq(shares.id, made.id));
    expect(row!.viewCount).toBe(8);
    const views = await db.select().from(shareViews).where(eq(shareViews.shareId, made.id));
    expect(views).toHaveLength(8);
  });
});

describe("share links: who may do what", () => {
  it("a viewer and a technician cannot create share links: page action and API are 403", async () => {
    for (const role of ["viewer", "technician"] as const) {
      const client = await as(role);
      const page = await run(() =>
        logShare.action({
          request: client.post(`/vehicles/${vehicleId}/logs/${logs.a}/share`, { intent: "create" }),
          params: { vehicleId: String(vehicleId), logId: String(logs.a) },
          context,
        } as never),
      );
      expect(page.status).toBe(403);
      const api = await apiCreate(logs.a, {}, tokens[role]);
      expect(api.status).toBe(403);
      expect(((await api.json()) as { error: { code: string } }).error.code).toBe("forbidden");
      const list = await run(() =>
        apiShares.loader({
          request: apiRequest("/api/v1/shares", tokens[role]),
          params: {},
          context,
        } as never),
      );
      expect(list.status).toBe(403);
    }
  });

  it("the page action needs the CSRF token, and another team's drive log is 404", async () => {
    const engineer = await as("engineer");
    const noToken = await run(() =>
      logShare.action({
        request: engineer.post(`/vehicles/${vehicleId}/logs/${logs.a}/share`, {
          intent: "create",
          csrf: null,
        }),
        params: { vehicleId: String(vehicleId), logId: String(logs.a) },
        context,
      } as never),
    );
    expect(noToken.status).toBe(403);
    const stranger = directClient({ id: other.accounts.engineer.id, teamId: other.id });
    const theirs = await run(async () =>
      logShare.action({
        request: (await stranger).post(`/vehicles/${vehicleId}/logs/${logs.a}/share`, {
          intent: "create",
        }),
        params: { vehicleId: String(vehicleId), logId: String(logs.a) },
        context,
      } as never),
    );
    expect(theirs.status).toBe(404);
    const otherToken = (
      await createApiToken({
        userId: other.accounts.engineer.id,
        teamId: other.id,
        name: "o",
        expiresAt: null,
      })
    ).token;
    expect((await apiCreate(logs.a, {}, otherToken)).status).toBe(404);
  });

  it("the page action refuses a post from another site's page, even with a valid token", async () => {
    // Issue 12 §9: the resource route's action skipped the Origin check that page actions get
    // from React Router, so a foreign Origin with a valid form token made a link (201).
    const engineer = await as("engineer");
    const path = `/vehicles/${vehicleId}/logs/${logs.a}/share`;
    const before = await db.select({ id: shares.id }).from(shares);
    const sent = engineer.post(path, { intent: "create" });
    const foreign = new Request(sent, {
      headers: { ...Object.fromEntries(sent.headers), Origin: "http://evil.example" },
    });
    const refused = await run(() =>
      logShare.action({
        request: foreign,
        params: { vehicleId: String(vehicleId), logId: String(logs.a) },
        context,
      } as never),
    );
    expect(refused.status).toBe(403);
    expect(await refused.text()).toMatch(/another site/);
    expect(await db.select({ id: shares.id }).from(shares)).toHaveLength(before.length);
    // The same post from the app's own page still works.
    const own = await run(() =>
      logShare.action({
        request: engineer.post(path, { intent: "create" }),
        params: { vehicleId: String(vehicleId), logId: String(logs.a) },
        context,
      } as never),
    );
    expect(own.status).toBe(201);
  });

  it("engineers see the team's links but manage their own; admins manage all; all of it is audited without tokens", async () => {
    const mine = await createdToken(logs.b, { note: "engineer's" });
    const list = await run(() =>
      apiShares.loader({
        request: apiRequest(`/api/v1/shares?logId=${logs.b}`, tokens.engineer2),
        params: {},
        context,
      } as never),
    );
    expect(list.status).toBe(200);
    const listed = (
      (await list.json()) as {
        shares: { id: number; canManage: boolean; createdBy: { name: string } }[];
      }
    ).shares;
    const seen = listed.find((s) => s.id === mine.id);
    expect(seen).toMatchObject({
      canManage: false,
      createdBy: { name: team.accounts.engineer.name },
    });

    const del = (token: string) =>
      run(() =>
        apiShare.action({
          request: apiRequest(`/api/v1/shares/${mine.id}`, token, { method: "DELETE" }),
          params: { shareId: String(mine.id) },
          context,
        } as never),
      );
    expect((await del(tokens.engineer2)).status).toBe(403);
    // Another team's caller does not even see it.
    const otherToken = (
      await createApiToken({
        userId: other.accounts.admin.id,
        teamId: other.id,
        name: "oa",
        expiresAt: null,
      })
    ).token;
    expect((await del(otherToken)).status).toBe(404);

    const extended = await run(() =>
      apiShare.action({
        request: apiRequest(`/api/v1/shares/${mine.id}`, tokens.admin, {
          method: "PATCH",
          json: { expiresInDays: 30 },
        }),
        params: { shareId: String(mine.id) },
        context,
      } as never),
    );
    expect(extended.status).toBe(200);
    const after = ((await extended.json()) as { share: { expiresAt: string } }).share;
    // 30 days of 86 400 s from now (SI day), within the few seconds the test takes.
    expect(Math.abs(Date.parse(after.expiresAt) - (Date.now() + 30 * 86_400_000))).toBeLessThan(
      60_000,
    );

    const first = await del(tokens.admin);
    expect(first.status).toBe(200);
    expect(((await first.json()) as { share: { state: string } }).share.state).toBe("revoked");
    // DELETE is idempotent (RFC 9110 §9.2.2): the same answer again, no second audit row.
    const second = await del(tokens.admin);
    expect(second.status).toBe(200);

    const events = await db
      .select({ action: auditEvents.action, detail: auditEvents.detail })
      .from(auditEvents)
      .where(and(eq(auditEvents.teamId, team.id)));
    const forMine = events.filter((e) => new RegExp(`share ${mine.id}\\b`).test(e.detail));
    expect(forMine.map((e) => e.action).sort()).toEqual([
      "share-created",
      "share-extended",
      "share-revoked",
    ]);
    for (const e of events) expect(e.detail).not.toContain(mine.token);
  });

  it("the page action extends and revokes a link of the caller's own", async () => {
    const engineer = await as("engineer");
    const path = `/vehicles/${vehicleId}/logs/${logs.a}/share`;
    const params = { vehicleId: String(vehicleId), logId: String(logs.a) };
    const made = await run(() =>
      logShare.action({
        request: engineer.post(path, {
          intent: "create",
          expiresInDays: "2",
          note: "panel",
          allowRawDownload: "on",
        }),
        params,
        context,
      } as never),
    );
    expect(made.status).toBe(201);
    const created = ((await made.json()) as { created: { id: number; url: string } }).created;
    const token = created.url.split("/s/")[1]!;
    // Raw download allowed: the file is the uploaded CSV, byte for byte.
    const file = await run(() =>
      shareFile.loader({
        request: new Request(`http://127.0.0.1:3999/s/${token}/file`),
        params: { token },
        context,
      } as never),
    );
    expect(file.status).toBe(200);
    expect(await file.text()).toBe(analyticIdleCsv(at800));

    const tooLong = await run(() =>
      logShare.action({
        request: engineer.post(path, {
          intent: "extend",
          shareId: String(created.id),
          expiresInDays: "91",
        }),
        params,
        context,
      } as never),
    );
    expect(tooLong.status).toBe(400);
    expect(((await tooLong.json()) as { error: { message: string } }).error.message).toBe(
      "Choose a whole number of days from 1 to 90.",
    );
    const revoked = await run(() =>
      logShare.action({
        request: engineer.post(path, { intent: "revoke", shareId: String(created.id) }),
        params,
        context,
      } as never),
    );
    expect(revoked.status).toBe(200);
    const listed = await run(() =>
      logShare.loader({ request: engineer.get(path), params, context } as never),
    );
    const rows = ((await listed.json()) as { shares: { id: number; state: string }[] }).shares;
    expect(rows.find((s) => s.id === created.id)?.state).toBe("revoked");
    // Extending a revoked link is refused: revoking is for good.
    const again = await run(() =>
      logShare.action({
        request: engineer.post(path, {
          intent: "extend",
          shareId: String(created.id),
          expiresInDays: "5",
        }),
        params,
        context,
      } as never),
    );
    expect(again.status).toBe(409);
  });
});

describe("API v1 share links: the contract", () => {
  it("POST answers 201 { share: { id, url, expiresAt } } with 14 days by default", async () => {
    const before = Date.now();
    const r = await apiCreate(logs.a, {});
    expect(r.status).toBe(201);
    const body = (await r.json()) as { share: Record<string, unknown> };
    expect(Object.keys(body)).toEqual(["share"]);
    expect(Object.keys(body.share).sort()).toEqual(["expiresAt", "id", "url"]);
    expect(body.share.url).toMatch(/^http:\/\/127\.0\.0\.1:3999\/s\/[A-Za-z0-9_-]{43}$/);
    // 14 days of 86 400 s (the default).
    const expires = Date.parse(String(body.share.expiresAt));
    expect(expires - before).toBeGreaterThanOrEqual(14 * 86_400_000);
    expect(expires - Date.now()).toBeLessThanOrEqual(14 * 86_400_000);
    // An empty body is the defaults too.
    const empty = await run(() =>
      apiLogShares.action({
        request: apiRequest(`/api/v1/logs/${logs.a}/shares`, tokens.engineer, { method: "POST" }),
        params: { logId: String(logs.a) },
        context,
      } as never),
    );
    expect(empty.status).toBe(201);
  });

  it.each([
    [{ expiresInDays: 0 }, "expiresInDays must be a whole number of days from 1 to 90."],
    [{ expiresInDays: 91 }, "expiresInDays must be a whole number of days from 1 to 90."],
    [{ expiresInDays: 1.5 }, "expiresInDays must be a whole number of days from 1 to 90."],
    [{ expiresInDays: "14" }, "expiresInDays must be a whole number of days from 1 to 90."],
    [{ note: "x".repeat(501) }, "note has at most 500 characters."],
    [{ expiresIn: 3 }, "Unknown field expiresIn: send expiresInDays, note or allowRawDownload."],
  ])("POST with %j is 400 invalid_share: %s", async (json, message) => {
    const r = await apiCreate(logs.a, json);
    expect(r.status).toBe(400);
    expect(await r.json()).toEqual({ error: { code: "invalid_share", message } });
  });

  it("bad JSON is 400 invalid_json; an unknown drive log 404; GET lists and GET one answers", async () => {
    const bad = await run(() =>
      apiLogShares.action({
        request: apiRequest(`/api/v1/logs/${logs.a}/shares`, tokens.engineer, {
          method: "POST",
          body: "{nope",
        }),
        params: { logId: String(logs.a) },
        context,
      } as never),
    );
    expect(bad.status).toBe(400);
    expect(((await bad.json()) as { error: { code: string } }).error.code).toBe("invalid_json");
    expect((await apiCreate(999_999_999, {})).status).toBe(404);

    const made = await createdToken(logs.a, { expiresInDays: 1, note: "one day" });
    const list = await run(() =>
      apiShares.loader({
        request: apiRequest("/api/v1/shares", tokens.admin),
        params: {},
        context,
      } as never),
    );
    const all = (
      (await list.json()) as {
        shares: { id: number; state: string; logId: number; note: string }[];
      }
    ).shares;
    expect(all.find((s) => s.id === made.id)).toMatchObject({
      state: "active",
      logId: logs.a,
      note: "one day",
    });
    const one = await run(() =>
      apiShare.loader({
        request: apiRequest(`/api/v1/shares/${made.id}`, tokens.engineer),
        params: { shareId: String(made.id) },
        context,
      } as never),
    );
    expect(one.status).toBe(200);
    const share = ((await one.json()) as { share: Record<string, unknown> }).share;
    expect(share).toMatchObject({ id: made.id, kind: "log", viewCount: 0, canManage: true });
    expect(JSON.stringify(share)).not.toContain(made.token);
  });
});

describe("share by e-mail", () => {
  it("a guest gets a working share link, a team member the normal in-app link", async () => {
    const engineer = await as("engineer");
    const guest = `guest-${Date.now()}@supplier.example`;
    const member = team.accounts.technician.email;
    const r = await run(() =>
      logShare.action({
        request: engineer.post(`/vehicles/${vehicleId}/logs/${logs.a}/share`, {
          intent: "email",
          recipients: `${guest}, ${member}`,
          message: "The idle with damper A.",
          expiresInDays: "7",
        }),
        params: { vehicleId: String(vehicleId), logId: String(logs.a) },
        context,
      } as never),
    );
    expect(r.status).toBe(200);
    expect(((await r.json()) as { notice: string }).notice).toBe(
      "Sent to 2 addresses: 1 with a share link, 1 team member with the normal link.",
    );
    const mail = await readStoredMail(mailDir);
    const toGuest = mail.find((m) => m.to.includes(guest))!;
    const toMember = mail.find((m) => m.to.includes(member))!;
    expect(toGuest.subject).toBe(
      `${team.accounts.engineer.name} shared a drive log with you on Twistlog`,
    );
    expect(toGuest.text).toContain("> The idle with damper A.");
    const link = toGuest.text.split(/\s+/).find((w) => w.includes("/s/"))!;
    const token = link.split("/s/")[1]!;
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    // The link in the mail works: the page's data and its chart JSON.
    const page = await sharePage.sharedPageData(await sharePage.requireShareForPage(token));
    expect(page.logs[0]!.fileName).toBe("share-idle-800.csv");
    expect((await chartsFor(token)).status).toBe(200);
    expect(toMember.text).toContain(`http://127.0.0.1:3999/vehicles/${vehicleId}/logs/${logs.a}`);
    expect(toMember.text).not.toContain("/s/");
  });

  it("bad addresses and too many are field errors, and nothing is sent", async () => {
    const engineer = await as("engineer");
    const before = (await readStoredMail(mailDir, 500)).length;
    for (const [recipients, message] of [
      [
        "not-an-address",
        "“not-an-address” is not an e-mail address (it looks like name@example.com).",
      ],
      [
        Array.from({ length: 11 }, (_, i) => `p${i}@x.example`).join(","),
        "At most 10 addresses at a time.",
      ],
      ["", "Enter at least one e-mail address."],
    ] as const) {
      const r = await run(() =>
        logShare.action({
          request: engineer.post(`/vehicles/${vehicleId}/logs/${logs.a}/share`, {
            intent: "email",
            recipients,
          }),
          params: { vehicleId: String(vehicleId), logId: String(logs.a) },
          context,
        } as never),
      );
      expect(r.status).toBe(400);
      const body = (await r.json()) as { result: { error: Record<string, string[]> } };
      expect(body.result.error.recipients).toEqual([message]);
    }
    expect((await readStoredMail(mailDir, 500)).length).toBe(before);
  });
});

describe("comments", () => {
  const subject = () => `log:${logs.a}`;
  const post = async (
    role: "engineer" | "technician" | "viewer",
    fields: Record<string, string>,
  ) => {
    const client = await as(role);
    return run(() =>
      commentsRoute.action({
        request: client.post(`/vehicles/${vehicleId}/comments`, {
          intent: "post",
          subject: subject(),
          ...fields,
        }),
        params: { vehicleId: String(vehicleId) },
        context,
      } as never),
    );
  };
  const list = async (role: "engineer" | "technician" | "viewer") => {
    const client = await as(role);
    const r = await run(() =>
      commentsRoute.loader({
        request: client.get(`/vehicles/${vehicleId}/comments?subject=${subject()}`),
        params: { vehicleId: String(vehicleId) },
        context,
      } as never),
    );
    return (await r.json()) as {
      comments: {
        id: number;
        body: string;
        pinRpm: number | null;
        pinTimeS: number | null;
        canDelete: boolean;
      }[];
      canPost: boolean;
      ranges: { durationS: number; rpmMin: number; rpmMax: number };
    };
  };

  it("a technician pins a comment to an engine speed inside the recording; outside it is refused", async () => {
    const r = await post("technician", {
      body: "A/C compressor engaged here.",
      pinKind: "rpm",
      pinValue: "800",
    });
    expect(r.status).toBe(201);
    const seen = await list("viewer");
    expect(seen.canPost).toBe(false);
    expect(seen.comments.find((c) => c.body === "A/C compressor engaged here.")).toMatchObject({
      pinRpm: 800,
      pinTimeS: null,
      canDelete: false,
    });
    // The analytic log idles at 800 rpm for 6 s (tests/support/analytic-log.ts): 3000 rpm and
    // 60 s lie outside it.
    expect(seen.ranges.durationS).toBeCloseTo(6, 1);
    for (const [pinKind, pinValue, message] of [
      [
        "rpm",
        "3000",
        `The recording covers ${seen.ranges.rpmMin}–${seen.ranges.rpmMax} rpm: pin to an engine speed in that range.`,
      ],
      [
        "time",
        "60",
        `The recording is ${seen.ranges.durationS.toFixed(1)} s long: pin to a time from 0 to ${seen.ranges.durationS.toFixed(1)} s.`,
      ],
      ["rpm", "", "Enter the engine speed in rpm."],
    ] as const) {
      const bad = await post("technician", { body: "out of range", pinKind, pinValue });
      expect(bad.status).toBe(400);
      expect(
        ((await bad.json()) as { result: { error: Record<string, string[]> } }).result.error
          .pinValue,
      ).toEqual([message]);
    }
    expect(seen.ranges.rpmMin).toBeLessThanOrEqual(800);
    expect(seen.ranges.rpmMax).toBeGreaterThanOrEqual(800);
  });

  it("a viewer cannot post (403); a mention e-mails that member; only the author deletes", async () => {
    expect((await post("viewer", { body: "may I?" })).status).toBe(403);
    const first = team.accounts.engineer.email.split("@")[0]!;
    const r = await post("technician", {
      body: `@${first} the idle looks rough at 3.2 s.`,
      pinKind: "time",
      pinValue: "3.2",
    });
    expect(r.status).toBe(201);
    const { id, notice } = (await r.json()) as { id: number; notice: string };
    expect(notice).toBe(`Comment posted; ${team.accounts.engineer.name} was notified by e-mail.`);
    const mail = (await readStoredMail(mailDir)).find((m) =>
      m.to.includes(team.accounts.engineer.email),
    )!;
    expect(mail.subject).toBe(
      `${team.accounts.technician.name} mentioned you in a comment on Twistlog`,
    );
    expect(mail.text).toContain(`/vehicles/${vehicleId}/logs/${logs.a}#comments`);

    const engineer = await as("engineer");
    const del = (client: Awaited<ReturnType<typeof as>>) =>
      run(() =>
        commentsRoute.action({
          request: client.post(`/vehicles/${vehicleId}/comments`, {
            intent: "delete",
            subject: subject(),
            commentId: String(id),
          }),
          params: { vehicleId: String(vehicleId) },
          context,
        } as never),
      );
    expect((await del(engineer)).status).toBe(403);
    expect((await del(await as("technician"))).status).toBe(200);
    const [row] = await db.select().from(comments).where(eq(comments.id, id));
    expect(row!.deletedAt).not.toBeNull();
    expect((await list("engineer")).comments.map((c) => c.id)).not.toContain(id);
  });
});
