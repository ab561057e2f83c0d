import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/lib/infra/db.server";
import { getEnv } from "~/lib/infra/env.server";
import { newSecret } from "~/lib/infra/secrets.server";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { HttpClient } from "../support/http-client";
import { repoRoot, startServer } from "../support/processes";

// Issue 12, Build 5: no secret in what the browser downloads, and the cookie flags that
// docs/decisions/004-sessions-in-database.md and 005-csrf.md document.

function filesUnder(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((entry) =>
    entry.isDirectory() ? filesUnder(join(dir, entry.name)) : [join(dir, entry.name)],
  );
}

describe("the built client assets hold no secret (npm test builds before vitest)", () => {
  const files = filesUnder(join(repoRoot, "build/client")).filter((f) =>
    /\.(js|mjs|css|html|json|map)$/.test(f),
  );
  const env = getEnv();
  const forbidden: Array<[string, string | RegExp]> = [
    ["the session secret's value", env.SESSION_SECRET],
    ["the database password", env.DATABASE_PASSWORD],
    ["the password hashing library", "argon2"],
    ["the database driver", "mysql2"],
    ["the mail libraries", /nodemailer|smtp-server|mailparser/],
    ["the worker pool", "piscina"],
    ["the multipart parser", "busboy"],
    ["a private key", /-----BEGIN [A-Z ]*PRIVATE KEY-----/],
    ["settings by name", /SESSION_SECRET|DATABASE_PASSWORD|SMTP_URL/],
    ["server-only messages", "No database answers at"],
  ];

  it("finds the client bundle", () => {
    expect(files.filter((f) => f.endsWith(".js")).length).toBeGreaterThan(5);
  });

  it.each(forbidden)("contains no %s", (_what, pattern) => {
    const hits = files.filter((f) => {
      const text = readFileSync(f, "utf8");
      return typeof pattern === "string" ? text.includes(pattern) : pattern.test(text);
    });
    expect(hits.map((f) => f.slice(repoRoot.length))).toEqual([]);
  });
});

describe("cookie flags (docs/decisions/004 and 005)", () => {
  let server: Awaited<ReturnType<typeof startServer>>;
  let publicServer: Awaited<ReturnType<typeof startServer>>;
  let team: TestTeam;
  beforeAll(async () => {
    [server, publicServer, team] = await Promise.all([
      startServer({}),
      // A public deployment: APP_URL https (which needs a secret of its own).
      startServer({ APP_URL: "https://twistlog.example", SESSION_SECRET: newSecret() }),
      createTestTeam("Cookies"),
    ]);
  });
  afterAll(async () => {
    await Promise.all([server?.stop(), publicServer?.stop()]);
    await pool.end();
  });

  /** The Set-Cookie lines of a fresh sign-in: the CSRF cookie (from the form) and the session's. */
  async function signInCookies(base: string, headers: Record<string, string> = {}) {
    const client = new HttpClient(base);
    const page = await client.get("/sign-in", headers);
    const csrf = page.headers.getSetCookie().find((c) => c.startsWith("twistlog_csrf="));
    const answer = await client.post(
      "/sign-in",
      { email: team.accounts.viewer.email, password: TEST_PASSWORD },
      headers,
    );
    expect(answer.status).toBe(302);
    const session = answer.headers.getSetCookie().find((c) => c.startsWith("twistlog_session="));
    return { csrf: csrf!, session: session! };
  }

  function attributes(line: string): string[] {
    return line
      .split(";")
      .slice(1)
      .map((a) => a.trim().toLowerCase());
  }

  it("plain http on localhost: HttpOnly, SameSite=Lax, Path=/, not Secure; the session lasts 30 days", async () => {
    const { csrf, session } = await signInCookies(server.url);
    for (const line of [csrf, session]) {
      const a = attributes(line);
      expect(a).toEqual(expect.arrayContaining(["httponly", "samesite=lax", "path=/"]));
      // A Secure cookie would never come back over http (docs/decisions/004).
      expect(a).not.toContain("secure");
    }
    // 30 days (docs/decisions/004) = 30 × 86 400 s.
    expect(attributes(session)).toContain(`max-age=${30 * 86_400}`);
  });

  it("a request that came over https (X-Forwarded-Proto from a trusted proxy): Secure as well", async () => {
    const https = server.url.replace("http:", "https:");
    const { csrf, session } = await signInCookies(server.url, {
      "X-Forwarded-Proto": "https",
      Origin: https,
    });
    for (const line of [csrf, session]) {
      expect(attributes(line)).toEqual(
        expect.arrayContaining(["httponly", "samesite=lax", "path=/", "secure"]),
      );
    }
  });

  it("an https APP_URL: Secure even on a plain-http request behind it", async () => {
    const { csrf, session } = await signInCookies(publicServer.url);
    for (const line of [csrf, session]) {
      expect(attributes(line)).toEqual(
        expect.arrayContaining(["httponly", "samesite=lax", "path=/", "secure"]),
      );
    }
  });
});
