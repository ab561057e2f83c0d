import { eq } from "drizzle-orm";
import { execFile } from "node:child_process";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { apiTokens } from "~/lib/infra/db/schema";
import { db, pool } from "~/lib/infra/db.server";
import { sha256Hex } from "~/lib/infra/secrets.server";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";

// API tokens made on the tokens page, used with Authorization: Bearer against /api/v1/.
let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
beforeAll(async () => {
  [server, team] = await Promise.all([startServer({}), createTestTeam("API")]);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
});

async function makeToken(email: string, name: string) {
  const client = new HttpClient(server.url);
  expect((await client.signIn(email, TEST_PASSWORD)).status).toBe(302);
  await client.get("/account/tokens");
  const r = await client.post("/account/tokens", { intent: "create", name, expires: "30" });
  expect(r.status).toBe(200);
  const token = /data-token="true">([^<]+)</.exec(r.html)?.[1];
  expect(token).toMatch(/^twl_[A-Za-z0-9_-]{43}$/);
  return { client, token: token! };
}

const me = (token: string | null) =>
  fetch(`${server.url}/api/v1/me`, token ? { headers: { Authorization: `Bearer ${token}` } } : {});

describe("API tokens", () => {
  it("a token made in the UI answers GET /api/v1/me with the owner, the team and the role", async () => {
    const { token } = await makeToken(team.accounts.technician.email, "upload script");
    const r = await me(token);
    expect(r.status).toBe(200);
    expect(await r.json()).toEqual({
      user: { email: team.accounts.technician.email },
      team: { id: team.id, name: team.name },
      role: "technician",
    });
  });

  it("works with curl, as the README shows", async () => {
    const { token } = await makeToken(team.accounts.viewer.email, "curl check");
    const { stdout } = await promisify(execFile)("curl", [
      "-s",
      "-H",
      `Authorization: Bearer ${token}`,
      `${server.url}/api/v1/me`,
    ]);
    expect(JSON.parse(stdout)).toMatchObject({
      user: { email: team.accounts.viewer.email },
      role: "viewer",
    });
  });

  it("is shown once and stored only as its sha256", async () => {
    const { client, token } = await makeToken(team.accounts.engineer.email, "stored check");
    const [row] = await db
      .select()
      .from(apiTokens)
      .where(eq(apiTokens.tokenHash, sha256Hex(token)));
    expect(row?.name).toBe("stored check");
    expect(JSON.stringify(row)).not.toContain(token.slice(4));
    const list = await client.get("/account/tokens");
    expect(list.html).not.toContain(token);
    expect(list.html).toContain(`${token.slice(0, 10)}…`);
  });

  it("stamps its last use at most once a minute (one row written by many parallel requests)", async () => {
    const { token } = await makeToken(team.accounts.technician.email, "stamp check");
    const where = eq(apiTokens.tokenHash, sha256Hex(token));
    const stamp = async () => (await db.select().from(apiTokens).where(where))[0]!.lastUsedAt;
    expect(await stamp()).toBeNull();
    expect((await me(token)).status).toBe(200);
    const first = await stamp();
    expect(first).not.toBeNull();
    // Within the minute: answered, but the row is not written again.
    const past = new Date(Date.now() - 30_000);
    await db.update(apiTokens).set({ lastUsedAt: past }).where(where);
    expect((await me(token)).status).toBe(200);
    expect((await stamp())!.getTime()).toBe(past.getTime());
    // Over a minute since the last stamp: stamped now.
    await db
      .update(apiTokens)
      .set({ lastUsedAt: new Date(Date.now() - 90_000) })
      .where(where);
    expect((await me(token)).status).toBe(200);
    expect(Date.now() - (await stamp())!.getTime()).toBeLessThan(30_000);
  });

  it("a revoked token gets 401 with a JSON error", async () => {
    const { client, token } = await makeToken(team.accounts.engineer.email, "to revoke");
    expect((await me(token)).status).toBe(200);
    const [row] = await db
      .select({ id: apiTokens.id })
      .from(apiTokens)
      .where(eq(apiTokens.tokenHash, sha256Hex(token)));
    const revoked = await client.post("/account/tokens", {
      intent: "revoke",
      tokenId: String(row!.id),
    });
    expect(revoked.status).toBe(200);
    const r = await me(token);
    expect(r.status).toBe(401);
    expect(r.headers.get("www-authenticate")).toMatch(/^Bearer/);
    expect(await r.json()).toEqual({
      error: { code: "unauthorized", message: "This API token is unknown, revoked or expired." },
    });
  });

  it("another user cannot revoke my token (404), an expired token and a removed member's token get 401", async () => {
    const { token } = await makeToken(team.accounts.admin.email, "mine");
    const [row] = await db
      .select({ id: apiTokens.id })
      .from(apiTokens)
      .where(eq(apiTokens.tokenHash, sha256Hex(token)));
    const stranger = new HttpClient(server.url);
    await stranger.signIn(team.accounts.viewer.email, TEST_PASSWORD);
    await stranger.get("/account/tokens");
    expect(
      (await stranger.post("/account/tokens", { intent: "revoke", tokenId: String(row!.id) }))
        .status,
    ).toBe(404);
    expect((await me(token)).status).toBe(200);

    await db
      .update(apiTokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(apiTokens.id, row!.id));
    expect((await me(token)).status).toBe(401);

    const leaver = await createTestTeam("Leaver");
    const { token: leaverToken } = await makeToken(leaver.accounts.engineer.email, "leaver");
    await pool.query("DELETE FROM memberships WHERE id = ?", [
      leaver.accounts.engineer.membershipId,
    ]);
    expect((await me(leaverToken)).status).toBe(401);
  });

  it("no token, a malformed header and an unknown API path get the JSON error shape", async () => {
    const none = await me(null);
    expect(none.status).toBe(401);
    expect(await none.json()).toMatchObject({ error: { code: "unauthorized" } });
    const basic = await fetch(`${server.url}/api/v1/me`, {
      headers: { Authorization: "Basic abc" },
    });
    expect(basic.status).toBe(401);
    const missing = await fetch(`${server.url}/api/v1/no-such-thing`);
    expect(missing.status).toBe(404);
    expect(await missing.json()).toEqual({
      error: { code: "not_found", message: "There is no such API endpoint." },
    });
  });

  it("an overlong token name is refused with a message and nothing is stored", async () => {
    const client = new HttpClient(server.url);
    await client.signIn(team.accounts.engineer.email, TEST_PASSWORD);
    await client.get("/account/tokens");
    const name = "n".repeat(81);
    const r = await client.post("/account/tokens", { intent: "create", name, expires: "30" });
    expect(r.status).toBe(400);
    expect(r.html).toContain("A token name has at most 80 characters.");
    expect(await db.select().from(apiTokens).where(eq(apiTokens.name, name))).toEqual([]);
  });
});
