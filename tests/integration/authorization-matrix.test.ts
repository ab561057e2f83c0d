import { randomBytes } from "node:crypto";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import routeConfig from "../../app/routes";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { HttpClient } from "../support/http-client";
import { repoRoot, startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";
import {
  CALLERS,
  dataTwin,
  expected,
  isPage,
  matrix,
  writes,
  type Caller,
  type Expected,
  type Fixtures,
  type Probe,
} from "./authorization-matrix.table";

// The authorization matrix (issue 12, build 1): every request of every route file in
// app/routes.ts (tests/integration/authorization-matrix.table.ts) as each of seven callers, against
// the production server with two teams' data. Each cell checks the status, that the answer holds
// nothing of a team the caller may not see, and, for a write that is refused, that nothing changed.

const testbed = await useJobTestbed("matrix");
const { db, pool } = await import("~/lib/infra/db.server");
const { users, memberships } = await import("~/lib/infra/db/schema");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { createShare, revokeShare } = await import("~/lib/data/shares.server");
const { commentData } = await import("~/lib/data/comments.server");
const { parseCommentSubject } = await import("~/lib/domain/comment-schema");
const { targetData } = await import("~/lib/data/targets.server");
const { signoffData } = await import("~/lib/data/signoffs.server");
const { startSession } = await import("~/lib/http/session.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
type TestTeam = Awaited<ReturnType<typeof createTestTeam>>;

// ---------------------------------------------------------------------------------------------
// The cells, known before any fixture exists (their names use placeholder ids).

interface Cell {
  name: string;
  file: string;
  probe: Probe;
  caller: Caller;
  expect: Expected;
}
const placeholders = {
  home: {
    teamId: ":team",
    vehicleId: ":v",
    logIds: [":l1", ":l2"],
    shareId: ":share",
    shareToken: ":token",
    compareShareToken: ":compareToken",
    commentId: ":comment",
    targetId: ":target",
    signoffId: ":signoff",
    signoffShareToken: ":signoffToken",
    invitationId: ":invitation",
    adminMembershipId: ":adminMember",
  },
  other: {
    teamId: ":otherTeam",
    vehicleId: ":otherV",
    logIds: [":otherL1", ":otherL2"],
    shareId: ":otherShare",
    shareToken: ":otherToken",
    compareShareToken: ":otherCompareToken",
    commentId: ":otherComment",
    targetId: ":otherTarget",
    signoffId: ":otherSignoff",
    signoffShareToken: ":otherSignoffToken",
    invitationId: ":otherInvitation",
    adminMembershipId: ":otherAdminMember",
  },
  spare: {
    sessionId: ":spareSession",
    apiTokenId: ":spareToken",
    commentId: ":spareComment",
    formShareId: ":spareShare1",
    apiShareId: ":spareShare2",
  },
  revokedShareToken: ":revokedToken",
} as unknown as Fixtures;

const cells: Cell[] = [];
for (const [file, row] of Object.entries(matrix)) {
  if (!("probes" in row)) continue;
  for (const probe of row.probes) {
    const all = [probe];
    if (isPage(file) && (probe.way === "page" || probe.way === "form")) all.push(dataTwin(probe));
    if (probe.way === "json" && probe.method === "GET") all.push(dataTwin(probe));
    for (const p of all)
      for (const caller of CALLERS) {
        const what = `${p.way} ${p.method}${p.intent ? ` ${p.intent}` : ""}${p.empty ? " (no body)" : ""}${p.noBoundary ? " (no boundary)" : ""} ${p.path(placeholders)}`;
        cells.push({
          name: `${file} · ${what} · ${caller}`,
          file,
          probe: p,
          caller,
          expect: expected(p, caller),
        });
      }
  }
}

// ---------------------------------------------------------------------------------------------
// Two teams with data, and the seven callers.

let server: Awaited<ReturnType<typeof startServer>>;
let fx: Fixtures;
const clients = {} as Record<Caller, HttpClient>;
const tokens = {} as Record<Caller, string | null>;
const markHome = `mxa${randomBytes(4).toString("hex")}`;
const markOther = `mxb${randomBytes(4).toString("hex")}`;
let forbiddenFor: (c: Cell) => string[];
interface Answer {
  status: number;
  location: string | null;
  body: string;
  changed?: string;
}
const answers = new Map<string, Answer>();

async function signedIn(email: string) {
  const client = await HttpClient.signedIn(server.url, email, TEST_PASSWORD);
  await client.get("/account"); // a page with forms: the CSRF token
  return client;
}

async function waitForDone(client: HttpClient, vehicleId: number, ids: number[]) {
  for (let i = 0; i < 600; i++) {
    const r = await client.get(`/vehicles/${vehicleId}/status`);
    const { logs } = JSON.parse(r.html) as { logs: { id: number; status: string }[] };
    const mine = logs.filter((l) => ids.includes(l.id));
    if (mine.some((l) => l.status === "failed")) throw new Error("a fixture drive log failed");
    if (mine.length === ids.length && mine.every((l) => l.status === "done")) return;
    await new Promise((resolve) => setTimeout(resolve, 200));
  }
  throw new Error("the fixture drive logs did not finish");
}

/** One team's vehicle, two analysed drive logs, links, a comment, a target and an invitation. */
async function seedTeam(t: TestTeam, mark: string, technician: HttpClient, admin: HttpClient) {
  const data = vehicleData(t.id);
  const vehicleId = await data.create(
    vehicleSchema.parse({ name: `Car ${mark}`, identifier: `ID-${mark}`, cylinders: 4, stroke: 4 }),
  );
  await technician.get(`/vehicles/${vehicleId}`);
  const short = { ...IDLE_800, durationS: 4 };
  const logIds: [number, number] = [
    await technician.uploadDriveLog(vehicleId, `idle-${mark}.csv`, analyticIdleCsv(short)),
    await technician.uploadDriveLog(
      vehicleId,
      `idle2-${mark}.csv`,
      analyticIdleCsv({ ...short, rpm: 1200 }),
    ),
  ];
  await waitForDone(technician, vehicleId, logIds);
  const engineer = { userId: t.accounts.engineer.id, role: "engineer" as const };
  const made = await createShare({
    teamId: t.id,
    caller: engineer,
    subject: { kind: "log", logId: logIds[0] },
    expiresInDays: 14,
    note: `Note ${mark}`,
    allowRawDownload: true,
  });
  const compared = await createShare({
    teamId: t.id,
    caller: engineer,
    subject: { kind: "comparison", vehicleId, logIds },
    expiresInDays: 14,
    note: `Comparison ${mark}`,
    allowRawDownload: false,
  });
  const commentId = await commentData(t.id).create({
    vehicleId,
    subject: parseCommentSubject(`log:${logIds[0]}`)!,
    author: { userId: t.accounts.technician.id, role: "technician" },
    body: `Comment ${mark}`,
    pin: {},
  });
  const targetId = await targetData(t.id).create(
    vehicleId,
    { kind: "rattle", name: `Target ${mark}`, maxRadS2: 400, conditions: [], gears: [] },
    t.accounts.engineer.id,
  );
  // A proposal waiting for approval (issue 16), resting on the first drive log and the target.
  const signoff = await signoffData(t.id).propose(
    vehicleId,
    {
      damperVariant: (await data.vehicle(vehicleId)).damperVariant,
      claims: [{ targetId, logIds: [logIds[0]] }],
      note: `Sign-off ${mark}`,
      deviations: [{ targetId, reason: "Fixture of the authorization matrix." }],
    },
    { ...engineer, ip: "127.0.0.1" },
    { notify: false },
  );
  const signoffShare = await createShare({
    teamId: t.id,
    caller: engineer,
    subject: { kind: "signoff", signoffId: signoff.id },
    expiresInDays: 14,
    note: `Sign-off link ${mark}`,
    allowRawDownload: false,
  });
  await admin.get("/team");
  const invitee = `invitee-${mark}@example.test`;
  const invited = await admin.post("/team", { intent: "invite", email: invitee, role: "viewer" });
  if (invited.status !== 200)
    throw new Error(
      `invitation answered ${invited.status}; server log:\n${server.output().slice(-3000)}`,
    );
  const [inv] = (await pool.query("SELECT id FROM invitations WHERE email = ?", [invitee]))[0] as {
    id: number;
  }[];
  return {
    teamId: t.id,
    vehicleId,
    logIds,
    shareId: made.id,
    shareToken: made.token,
    compareShareToken: compared.token,
    commentId,
    targetId,
    signoffId: signoff.id,
    signoffShareToken: signoffShare.token,
    invitationId: inv!.id,
    adminMembershipId: t.accounts.admin.membershipId,
  };
}

/** The data that a refused request must leave alone (view counters and sign-in failures aside). */
async function fingerprint(): Promise<string> {
  const q = async (sql: string) => (await pool.query(sql))[0];
  return JSON.stringify([
    await q(
      "CHECKSUM TABLE teams, users, memberships, invitations, vehicles, drive_logs, analyses, targets, comments, password_resets, signoffs, signoff_steps",
    ),
    await q("SELECT id, revoked_at, expires_at, note FROM shares ORDER BY id"),
    await q("SELECT id FROM sessions ORDER BY id"),
    await q("SELECT id, revoked_at FROM api_tokens ORDER BY id"),
    await q("SELECT COUNT(*) AS n FROM audit_events WHERE action NOT LIKE 'sign-in%'"),
  ]);
}

async function send(cell: Cell): Promise<Answer> {
  const { probe, caller } = cell;
  const client = clients[caller];
  const path = probe.path(fx);
  const bearer = probe.way === "api-bearer" || probe.way === "upload-bearer";
  const headers: Record<string, string> = { "X-Forwarded-For": client.ip };
  if (bearer) {
    if (tokens[caller]) headers.Authorization = `Bearer ${tokens[caller]}`;
  } else {
    headers.Cookie = client.cookieHeader();
  }
  let body: BodyInit | undefined;
  if (probe.method !== "GET") {
    headers.Origin = server.url;
    const api = path.startsWith("/api/");
    if (probe.empty) {
      // no body, no Content-Type
    } else if (probe.noBoundary) {
      headers["Content-Type"] = "multipart/form-data";
      body = '--x\r\nContent-Disposition: form-data; name="file"\r\n\r\nabc\r\n--x--\r\n';
    } else if (probe.way === "upload" || probe.way === "upload-bearer") {
      const form = new FormData();
      if (!api) form.set("csrf", client.csrf);
      for (const [k, v] of Object.entries(probe.form?.(fx, caller) ?? {})) form.set(k, v);
      body = form;
    } else if (probe.json !== undefined || (api && probe.form === undefined)) {
      if (probe.json !== undefined) {
        headers["Content-Type"] = "application/json";
        body = JSON.stringify(probe.json);
      }
    } else {
      headers["Content-Type"] = "application/x-www-form-urlencoded";
      body = new URLSearchParams({ csrf: client.csrf, ...probe.form?.(fx, caller) });
    }
  }
  const response = await fetch(server.url + path, {
    method: probe.method,
    redirect: "manual",
    headers,
    body,
  });
  return {
    status: response.status,
    location: response.headers.get("location"),
    body: await response.text(),
  };
}

/** Runs `work` over `items`, at most `n` at a time. */
async function inBatches<T>(items: T[], n: number, work: (item: T) => Promise<void>) {
  const queue = [...items];
  await Promise.all(
    Array.from({ length: n }, async () => {
      for (let item = queue.shift(); item; item = queue.shift()) await work(item);
    }),
  );
}

async function undo(what: NonNullable<Probe["undo"]>) {
  if (what === "unarchive-vehicle")
    await vehicleData(fx.home.teamId).setArchived(fx.home.vehicleId, false);
  if (what === "unrevoke-invitation")
    await pool.query("UPDATE invitations SET revoked_at = NULL WHERE id = ?", [
      fx.home.invitationId,
    ]);
  if (what === "unrevoke-spare-token")
    await pool.query("UPDATE api_tokens SET revoked_at = NULL WHERE id = ?", [fx.spare.apiTokenId]);
}

const refused = (e: Expected) => typeof e !== "number" || e >= 400;

beforeAll(async () => {
  let home: TestTeam, other: TestTeam;
  [server, home, other] = await Promise.all([
    startServer(testbed.serverEnv),
    createTestTeam(`Home ${markHome}`),
    createTestTeam(`Other ${markOther}`),
  ]);
  const roles = ["viewer", "technician", "engineer", "admin"] as const;
  const signIns = await Promise.all([
    ...roles.map((role) => signedIn(home.accounts[role].email)),
    signedIn(other.accounts.admin.email),
    signedIn(other.accounts.technician.email),
  ]);
  roles.forEach((role, i) => (clients[role] = signIns[i]!));
  clients.otherTeam = signIns[4]!;
  const otherTechnician = signIns[5]!;

  // A member who is none of the callers owns the throwaway session, token and comment.
  const [spareUser] = await db
    .insert(users)
    .values({ email: `spare-${markHome}@example.test`, name: "Spare Member", passwordHash: "x" })
    .$returningId();
  await db
    .insert(memberships)
    .values({ teamId: home.id, userId: spareUser!.id, role: "technician" });

  const [homeFx, otherFx] = await Promise.all([
    seedTeam(home, markHome, clients.technician, clients.admin),
    seedTeam(other, markOther, otherTechnician, clients.otherTeam),
  ]);
  await startSession(new Request(`${server.url}/sign-in`), spareUser!.id, home.id, "127.0.0.1");
  const [session] = (
    await pool.query("SELECT id FROM sessions WHERE user_id = ?", [spareUser!.id])
  )[0] as {
    id: string;
  }[];
  const spareToken = await createApiToken({
    userId: spareUser!.id,
    teamId: home.id,
    name: "spare",
    expiresAt: null,
  });
  const spareComment = await commentData(home.id).create({
    vehicleId: homeFx.vehicleId,
    subject: parseCommentSubject(`log:${homeFx.logIds[0]}`)!,
    author: { userId: spareUser!.id, role: "technician" },
    body: "A comment only an admin may delete",
    pin: {},
  });
  const engineer = { userId: home.accounts.engineer.id, role: "engineer" as const };
  const throwaway = () =>
    createShare({
      teamId: home.id,
      caller: engineer,
      subject: { kind: "log", logId: homeFx.logIds[0] },
      expiresInDays: 1,
      note: "",
      allowRawDownload: false,
    });
  const [formShare, apiShare, revoked] = [await throwaway(), await throwaway(), await throwaway()];
  await revokeShare(home.id, engineer, revoked.id);
  fx = {
    home: homeFx,
    other: otherFx,
    spare: {
      sessionId: session!.id,
      apiTokenId: spareToken.id,
      commentId: spareComment,
      formShareId: formShare.id,
      apiShareId: apiShare.id,
    },
    revokedShareToken: revoked.token,
  };

  // The callers without an account: one who only opened a page, one who only holds the link.
  clients.anonymous = new HttpClient(server.url);
  await clients.anonymous.get("/sign-in");
  clients.shareGuest = new HttpClient(server.url);
  await clients.shareGuest.get(`/s/${homeFx.shareToken}`);
  await clients.shareGuest.get("/sign-in");
  tokens.anonymous = null;
  tokens.shareGuest = homeFx.shareToken; // a share token is no API token
  for (const role of ["viewer", "technician", "engineer", "admin"] as const)
    tokens[role] = (
      await createApiToken({
        userId: home.accounts[role].id,
        teamId: home.id,
        name: role,
        expiresAt: null,
      })
    ).token;
  tokens.otherTeam = (
    await createApiToken({
      userId: other.accounts.admin.id,
      teamId: other.id,
      name: "o",
      expiresAt: null,
    })
  ).token;

  const homeMarks = [markHome, home.name, ...Object.values(home.accounts).map((a) => a.email)];
  const otherMarks = [markOther, other.name, ...Object.values(other.accounts).map((a) => a.email)];
  forbiddenFor = (c) =>
    c.probe.way === "share"
      ? [...otherMarks, ...Object.values(home.accounts).map((a) => a.email)]
      : c.caller === "otherTeam"
        ? homeMarks
        : otherMarks;

  // Reads first, 8 at a time. Then the writes that must be refused (or fail validation), 8 at a
  // time between two fingerprints of the data; then the allowed ones one by one, each undone
  // where it changed a fixture; signing out last, since it ends the caller's session.
  const reads = cells.filter((c) => !writes(c.probe));
  // Opening a shared page counts a view: those go one by one (concurrent views of one link are
  // a separate finding, not a question of access).
  const views = reads.filter((c) => c.file === "routes/share.tsx");
  await inBatches(
    reads.filter((c) => !views.includes(c)),
    8,
    async (c) => void answers.set(c.name, await send(c)),
  );
  for (const c of views) answers.set(c.name, await send(c));
  const signOuts = cells.filter((c) => writes(c.probe) && c.file === "routes/sign-out.ts");
  const rest = cells.filter((c) => writes(c.probe) && c.file !== "routes/sign-out.ts");
  const mustRefuse = rest.filter((c) => refused(c.expect));
  for (let i = 0; i < mustRefuse.length; i += 8) {
    const batch = mustRefuse.slice(i, i + 8);
    const before = await fingerprint();
    const got = await Promise.all(batch.map(send));
    const after = await fingerprint();
    batch.forEach((c, j) => {
      if (after !== before)
        got[j]!.changed = `data changed while these ran: ${batch.map((b) => b.name).join("; ")}`;
      answers.set(c.name, got[j]!);
    });
  }
  for (const c of [...rest.filter((c) => !refused(c.expect)), ...signOuts]) {
    const answer = await send(c);
    if (c.probe.undo && answer.status < 300) await undo(c.probe.undo);
    answers.set(c.name, answer);
  }
}, 240_000);

afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

// ---------------------------------------------------------------------------------------------

function walk(routes: { file: string; children?: unknown[] }[]): string[] {
  return routes.flatMap((r) => [r.file, ...walk((r.children ?? []) as typeof routes)]);
}

/**
 * The form intents a route's source knows: `intent === "x"`, `form.get("intent") === "x"`,
 * z.literal("x") and enum lists in its schemas, `name="intent" value="x"` in its forms.
 */
function intentsIn(file: string): string[] {
  const sources = [file];
  if (/(drive-log|comparison)\.share\.ts$/.test(file))
    sources.push("lib/http/share-panel.server.ts");
  const found = new Set<string>();
  for (const s of sources) {
    const text = readFileSync(join(repoRoot, "app", s), "utf8");
    for (const m of text.matchAll(/(?<!typeof )intent\s*[!=]==\s*"([a-z-]+)"/g)) found.add(m[1]!);
    for (const m of text.matchAll(/get\("intent"\)\s*[!=]==\s*"([a-z-]+)"/g)) found.add(m[1]!);
    for (const m of text.matchAll(/name="intent"\s+value="([a-z-]+)"/g)) found.add(m[1]!);
    for (const m of text.matchAll(/intent: z\.literal\("([a-z-]+)"\)/g)) found.add(m[1]!);
    for (const m of text.matchAll(/intent: z\.enum\(\[([^\]]+)\]\)/g))
      for (const q of m[1]!.matchAll(/"([a-z-]+)"/g)) found.add(q[1]!);
    for (const m of text.matchAll(/_INTENTS = \[([^\]]+)\]/g))
      for (const q of m[1]!.matchAll(/"([a-z-]+)"/g)) found.add(q[1]!);
  }
  return [...found].sort();
}

describe("the matrix covers app/routes.ts", () => {
  it("every route file in app/routes.ts has a row, and every row is a route file", () => {
    const files = walk(routeConfig as never).sort();
    expect(files.length).toBeGreaterThan(40);
    expect(Object.keys(matrix).sort()).toEqual(files);
  });

  it("every form intent in a route's source has a request in its row", () => {
    for (const [file, row] of Object.entries(matrix)) {
      const tested = "probes" in row ? new Set(row.probes.map((p) => p.intent)) : new Set();
      for (const intent of intentsIn(file))
        expect(tested.has(intent), `${file}: intent "${intent}" has no request`).toBe(true);
    }
  });

  it(`has ${cells.length} cells: every request × the seven callers`, () => {
    expect(cells.length % CALLERS.length).toBe(0);
    expect(new Set(cells.map((c) => c.name)).size).toBe(cells.length);
  });
});

function check(cell: Cell) {
  const answer = answers.get(cell.name);
  expect(answer, "no answer recorded").toBeDefined();
  const { status, location, body } = answer!;
  const said = `${status} ${location ?? ""} ${body.slice(0, 200)}`;
  const e = cell.expect;
  if (e === "redirect") {
    expect([302, 303], said).toContain(status);
    expect(location ?? "", said).toMatch(/^\/sign-in/);
  } else if (e === "data-redirect") {
    expect(status, said).toBe(202);
    expect(body, said).toContain("/sign-in");
  } else if (e === "json-refusal") {
    if (status === 202) expect(body, said).toContain("/sign-in");
    else if (status !== 401) {
      expect([302, 303], said).toContain(status);
      expect(location ?? "", said).toMatch(/^\/sign-in/);
    }
  } else {
    expect(status, said).toBe(e);
    if (e === cell.probe.ok && cell.probe.okText) expect(body, said).toContain(cell.probe.okText);
    if (e === cell.probe.ok && cell.probe.shows)
      expect(body, "the answer shows the caller's own data").toContain(
        cell.caller === "otherTeam" && cell.probe.way !== "share" ? markOther : markHome,
      );
  }
  for (const mark of forbiddenFor(cell))
    expect(body.includes(mark), `another team's "${mark}" is in the answer`).toBe(false);
  expect(answer!.changed, "a refused request changed data").toBeUndefined();
}

describe("authorization matrix", () => {
  for (const cell of cells) {
    it(cell.name, () => check(cell));
  }
});
