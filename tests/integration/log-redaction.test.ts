import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApiToken } from "~/lib/data/api-tokens.server";
import { pool } from "~/lib/infra/db.server";
import { getEnv } from "~/lib/infra/env.server";
import { newSecret } from "~/lib/infra/secrets.server";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { startDbProxy } from "../support/db-proxy";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";

// The server log after requests that carry every kind of secret (issue 12 §8), and what the
// server answers while its database is away (issue 12 §7). The production server reaches the
// test database through a relay (tests/support/db-proxy.ts) that the test cuts and restores.

let server: Awaited<ReturnType<typeof startServer>>;
let proxy: Awaited<ReturnType<typeof startDbProxy>>;
let team: TestTeam;
let apiToken: string;
// Secrets in the shapes the app makes them (app/lib/infra/secrets.server.ts: 32 random bytes, base64url).
const shareToken = newSecret();
const resetToken = newSecret();
const inviteToken = newSecret();
const badApiToken = newSecret("twl_");
let signedIn: HttpClient;

beforeAll(async () => {
  const env = getEnv();
  proxy = await startDbProxy({ host: env.DATABASE_HOST, port: env.DATABASE_PORT });
  [server, team] = await Promise.all([
    // Every request counts as slow here, so the slow-request line is checked for secrets too.
    startServer({ DATABASE_PORT: String(proxy.port), SLOW_REQUEST_MS: "0" }),
    createTestTeam("Log"),
  ]);
  const made = await createApiToken({
    userId: team.accounts.engineer.id,
    teamId: team.id,
    name: "log test",
    expiresAt: null,
  });
  apiToken = made.token;
});
afterAll(async () => {
  await server?.stop();
  await proxy?.close();
  await pool.end();
});

function send(path: string, init: RequestInit & { headers?: Record<string, string> } = {}) {
  return fetch(server.url + path, { redirect: "manual", ...init });
}

describe("no secret reaches the server log (issue 12 §8)", () => {
  it("requests with share, reset, invitation and API tokens get no 5xx and log no token", async () => {
    const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });
    const answers: Array<[string, number]> = [];
    const note = async (label: string, response: Promise<Response>) => {
      const r = await response;
      await r.body?.cancel();
      answers.push([label, r.status]);
    };
    await note("POST share", send(`/s/${shareToken}`, { method: "POST" }));
    await note("PUT share", send(`/s/${shareToken}`, { method: "PUT" }));
    await note("GET share/nonexistent", send(`/s/${shareToken}/nonexistent`));
    await note("POST share/nonexistent", send(`/s/${shareToken}/nonexistent`, { method: "POST" }));
    await note("GET share", send(`/s/${shareToken}`));
    await note("GET share charts", send(`/s/${shareToken}/charts.json`));
    await note("DELETE reset", send(`/reset-password/${resetToken}`, { method: "DELETE" }));
    await note("POST reset", send(`/reset-password/${resetToken}`, { method: "POST" }));
    await note("GET invitation", send(`/invitations/${inviteToken}`));
    await note("POST invitation", send(`/invitations/${inviteToken}`, { method: "POST" }));
    await note("bad token", send("/api/v1/me", { headers: bearer(badApiToken) }));
    await note("DELETE me", send("/api/v1/me", { method: "DELETE", headers: bearer(apiToken) }));
    await note("no such log", send("/api/v1/logs/999999999", { headers: bearer(apiToken) }));
    // Refusals, or the "this link no longer works" pages of unknown reset and invitation links.
    for (const [label, status] of answers) expect(status, label).toBeLessThan(500);
    expect(answers.filter(([, status]) => status >= 400).length).toBeGreaterThanOrEqual(10);
    const log = server.output();
    for (const secret of [shareToken, resetToken, inviteToken, apiToken, badApiToken]) {
      expect(log).not.toContain(secret);
    }
    expect(log).not.toMatch(/^\s+at \S/m);
    // The slow-request lines name the request with its token redacted. Each is written when the
    // answer's connection closes, which may be after the client has read it; the client above
    // stops reading early, so the line may say so instead of the status.
    const slowLine = (request: string) =>
      new RegExp(`^slow request: ${request} → (\\d{3}|client went away) after \\d+\\.\\d s$`, "m");
    await expect.poll(server.output).toMatch(slowLine("GET /s/\\[redacted\\]/charts\\.json"));
    await expect.poll(server.output).toMatch(slowLine("POST /invitations/\\[redacted\\]"));
    expect(server.output()).not.toContain(shareToken);
  });
});

describe("while the database is away (issue 12 §7)", () => {
  it("signs in before the outage", async () => {
    signedIn = new HttpClient(server.url);
    const answer = await signedIn.signIn(team.accounts.engineer.email, TEST_PASSWORD);
    expect(answer.status).toBe(302);
  });

  it("answers 503 (JSON for the API, the error page for pages), one redacted line each", async () => {
    proxy.cut();
    const from = server.output().length;

    const api = await send("/api/v1/me", { headers: { Authorization: `Bearer ${apiToken}` } });
    expect(api.status).toBe(503);
    expect(await api.json()).toEqual({
      error: { code: "database_unavailable", message: expect.stringContaining("database") },
    });

    const page = await signedIn.get("/vehicles");
    expect(page.status).toBe(503);
    expect(page.html).toContain("Temporarily unavailable");

    // A resource route (JSON) of the app's pages, signed in.
    const status = await signedIn.get("/vehicles/1/status");
    expect(status.status).toBe(503);
    expect(status.html).toContain("database is not available");

    for (const path of [
      `/s/${shareToken}`,
      `/s/${shareToken}/charts.json`,
      `/reset-password/${resetToken}`,
      `/invitations/${inviteToken}`,
    ]) {
      const answer = await new HttpClient(server.url).get(path);
      expect(answer.status, path).toBe(503);
    }

    const log = server.output().slice(from);
    expect(log).toMatch(/^503 GET \/api\/v1\/me: /m);
    expect(log).toMatch(/^503 GET \/vehicles: /m);
    expect(log).toMatch(/^503 GET \/s\/\[redacted\]: /m);
    expect(log).toMatch(/^503 GET \/reset-password\/\[redacted\]: /m);
    expect(log).toMatch(/^503 GET \/invitations\/\[redacted\]: /m);
    for (const secret of [shareToken, resetToken, inviteToken, apiToken]) {
      expect(log).not.toContain(secret);
    }
    const session = signedIn.cookies.get("twistlog_session")!;
    expect(server.output()).not.toContain(session);
    // One line per failed request, no stack trace.
    expect(log).not.toMatch(/^\s+at \S/m);
  });

  it("serves again once the database is back, without a restart", async () => {
    proxy.restore();
    const api = await send("/api/v1/me", { headers: { Authorization: `Bearer ${apiToken}` } });
    expect(api.status).toBe(200);
    const page = await signedIn.get("/vehicles");
    expect(page.status).toBe(200);
  });
});
