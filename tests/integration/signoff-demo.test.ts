import { createHash } from "node:crypto";
import canonicalize from "canonicalize";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runTs, startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";
import { bearerFetch, type ApiFetch } from "../support/trend-logs";
import type { SignoffJson, SignoffRecord } from "~/lib/domain/signoff";

// The demo's sign-offs (issue 16: "npm start shows the feature at once"): a fresh database gets
// the demo seed (scripts/seed.ts, as npm start runs it), then two app instances start on it at
// once; when they have analysed the Kestrel sample logs, KST-D4 has exactly one sign-off approved
// by the demo admin and one proposal of the demo engineer waiting — not two of each — and every
// claim of the approved one genuinely passes.
const testbed = await useJobTestbed("signoffdemo");
const { pool } = await import("~/lib/infra/db.server");
const { createApiToken } = await import("~/lib/data/api-tokens.server");
const { seedDemoSignoffs } = await import("~/demo/demo-signoffs.server");

let servers: Awaited<ReturnType<typeof startServer>>[] = [];
let api: ApiFetch;
let vehicleId: number;
let signoffs: SignoffJson[] = [];

const sha256 = (text: string) => createHash("sha256").update(text).digest("hex");

beforeAll(async () => {
  const seeded = await runTs("scripts/seed.ts", testbed.serverEnv, 60_000);
  if (seeded.code !== 0) throw new Error(`seed: ${seeded.stderr}`);
  servers = await Promise.all([startServer(testbed.serverEnv), startServer(testbed.serverEnv)]);
  const [[viewer]] = (await pool.query(
    `SELECT u.id, m.team_id AS teamId FROM users u JOIN memberships m ON m.user_id = u.id
     WHERE u.email = 'viewer@twistlog.test'`,
  )) as unknown as [{ id: number; teamId: number }[]];
  const { token } = await createApiToken({
    userId: viewer!.id,
    teamId: viewer!.teamId,
    name: "demo test",
    expiresAt: null,
  });
  api = bearerFetch(servers[0]!.url, token);
  const { vehicles } = (await (await api("/api/v1/vehicles")).json()) as {
    vehicles: { id: number; identifier: string }[];
  };
  vehicleId = vehicles.find((v) => v.identifier === "KST-D4")!.id;
  // The analyses of eight sample logs, then the poll every few seconds: up to about four minutes.
  for (let i = 0; i < 480 && signoffs.length < 2; i++) {
    await new Promise((resolve) => setTimeout(resolve, 500));
    const r = await api(`/api/v1/signoffs?vehicleId=${vehicleId}`);
    signoffs = ((await r.json()) as { signoffs: SignoffJson[] }).signoffs;
  }
  if (signoffs.length < 2)
    throw new Error(`no demo sign-offs; server log:\n${servers[0]!.output().slice(-3000)}`);
}, 300_000);
afterAll(async () => {
  await Promise.all(servers.map((s) => s.stop()));
  await pool.end();
  await testbed.close();
});

describe("the demo sign-offs", () => {
  it("KST-D4 has one approved sign-off of damper A and one proposal of damper B, made once by two instances", async () => {
    // Another round of every instance's poll (every 3 s), then three more seeds at once here:
    // one takes the lock and finds the sign-offs there, the others find it taken or the same.
    await new Promise((resolve) => setTimeout(resolve, 7_000));
    const again = await Promise.all([seedDemoSignoffs(), seedDemoSignoffs(), seedDemoSignoffs()]);
    expect(again).toContain("present");
    for (const outcome of again) expect(["present", "waiting"]).toContain(outcome);
    const r = await api(`/api/v1/signoffs?vehicleId=${vehicleId}`);
    const now = ((await r.json()) as { signoffs: SignoffJson[] }).signoffs;
    expect(now.map((s) => [s.damperVariant, s.state]).sort()).toEqual([
      ["A", "approved"],
      ["B", "proposed"],
    ]);
    for (const s of now) expect(s.proposedBy.email).toBe("engineer@twistlog.test");
    expect(now.find((s) => s.state === "approved")!.decidedBy?.email).toBe("admin@twistlog.test");
    expect(servers.map((s) => s.output()).join("\n")).toMatch(
      /demo sign-offs: one approved, one awaiting approval on KST-D4/,
    );
  });

  it("the approved one genuinely passes every claim, with its digest over the RFC 8785 record and a stored report", async () => {
    const approved = signoffs.find((s) => s.state === "approved")!;
    const { record, signoff } = (await (await api(`/api/v1/signoffs/${approved.id}`)).json()) as {
      record: SignoffRecord;
      signoff: SignoffJson;
    };
    expect(record.claims.length).toBeGreaterThanOrEqual(4);
    for (const c of record.claims) {
      expect([c.targetName, c.status, c.deviation]).toEqual([c.targetName, "pass", null]);
      expect(c.margin, c.targetName).toBeGreaterThan(0);
    }
    expect(sha256(canonicalize(record)!)).toBe(signoff.digest);
    const pdf = await api(`/api/v1/signoffs/${approved.id}/report.pdf`);
    expect(pdf.status).toBe(200);
    const bytes = Buffer.from(await pdf.arrayBuffer());
    expect(pdf.headers.get("etag")).toBe(`"${createHash("sha256").update(bytes).digest("hex")}"`);
  });

  it("the waiting one rests on damper B's run-up and passes it", async () => {
    const waiting = signoffs.find((s) => s.state === "proposed")!;
    const { record } = (await (await api(`/api/v1/signoffs/${waiting.id}`)).json()) as {
      record: SignoffRecord;
    };
    expect(record.logs.map((l) => l.fileName)).toEqual([
      "kestrel-kst-d4-runup-3rd-full-load-damper-b.csv",
    ]);
    expect(record.claims.map((c) => c.status)).toEqual(["pass"]);
  });

  it("the damper-health trend takes damper A's baseline from the approved sign-off, B's from its first analysis", async () => {
    const approved = signoffs.find((s) => s.state === "approved")!;
    const { record } = (await (await api(`/api/v1/signoffs/${approved.id}`)).json()) as {
      record: SignoffRecord;
    };
    const trend = (await (await api(`/api/v1/vehicles/${approved.vehicleId}/trend`)).json()) as {
      variants: { damperVariant: string; baseline: { logId: number; kind: string } | null }[];
    };
    const a = trend.variants.find((v) => v.damperVariant === "A")!;
    expect(a.baseline?.kind).toBe("signed-off");
    expect(record.logs.map((l) => l.id)).toContain(a.baseline?.logId);
    // B's only sign-off is still a proposal: not signed off.
    expect(trend.variants.find((v) => v.damperVariant === "B")!.baseline?.kind).toBe(
      "first-analysed",
    );
  });
});
