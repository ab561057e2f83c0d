import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEvents, sessions, signInFailures } from "~/lib/infra/db/schema";
import { db, pool } from "~/lib/infra/db.server";
import { THROTTLE } from "~/lib/infra/throttle.server";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";

// Sign-in and sign-out over HTTP against the production server and the real MariaDB.
let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
beforeAll(async () => {
  [server, team] = await Promise.all([startServer({}), createTestTeam("Sign-in")]);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
});

const sameRefusal = "The e-mail address or the password is not right.";

describe("sign-in and sign-out", () => {
  it.each(["admin", "engineer", "technician", "viewer"] as const)(
    "%s signs in (session row, httpOnly SameSite=Lax cookie), reaches /team, signs out",
    async (role) => {
      const account = team.accounts[role];
      const client = new HttpClient(server.url);
      const signedIn = await client.signIn(account.email, TEST_PASSWORD);
      expect(signedIn.status).toBe(302);
      expect(signedIn.headers.get("location")).toBe("/vehicles");
      const cookie = signedIn.headers.getSetCookie().find((c) => c.startsWith("twistlog_session="));
      expect(cookie).toMatch(/HttpOnly/i);
      expect(cookie).toMatch(/SameSite=Lax/i);
      // Plain http on localhost: a Secure cookie would never come back.
      expect(cookie).not.toMatch(/Secure/i);
      const rows = await db.select().from(sessions).where(eq(sessions.userId, account.id));
      expect(rows.length).toBeGreaterThanOrEqual(1);

      const page = await client.get("/team");
      expect(page.status).toBe(200);
      expect(page.html).toContain(team.name);
      expect(page.html).toContain(account.name);

      const out = await client.post("/sign-out", {});
      expect(out.status).toBe(302);
      expect(out.headers.get("location")).toBe("/sign-in?notice=signed-out");
      expect(await db.select().from(sessions).where(eq(sessions.userId, account.id))).toEqual([]);
      const after = await client.get("/team");
      expect(after.status).toBe(302);
      expect(after.headers.get("location")).toBe("/sign-in?redirectTo=%2Fteam");
    },
  );

  it("refuses a wrong password and an unknown e-mail with the same message and status", async () => {
    const client = new HttpClient(server.url);
    const wrong = await client.signIn(team.accounts.viewer.email, "not the password");
    const unknown = await client.signIn("nobody-here@example.test", "not the password");
    expect(wrong.status).toBe(400);
    expect(unknown.status).toBe(400);
    expect(wrong.html).toContain(sameRefusal);
    expect(unknown.html).toContain(sameRefusal);
    expect(wrong.headers.getSetCookie().some((c) => c.startsWith("twistlog_session="))).toBe(false);
    // The audit log knows which it was; the page does not say.
    const failed = await db
      .select({ detail: auditEvents.detail })
      .from(auditEvents)
      .where(
        and(
          eq(auditEvents.action, "sign-in-failed"),
          eq(auditEvents.actorEmail, team.accounts.viewer.email),
        ),
      );
    expect(failed.map((f) => f.detail)).toContain("wrong password");
  });

  it(`throttles an account after ${THROTTLE.perAccount} failures, also for the right password and across a restart`, async () => {
    const victim = (await createTestTeam("Throttle")).accounts.engineer;
    const client = new HttpClient(server.url);
    for (let i = 0; i < THROTTLE.perAccount; i++) {
      const r = await client.signIn(victim.email, `guess ${i}`);
      expect(r.status).toBe(400);
    }
    const locked = await client.signIn(victim.email, TEST_PASSWORD);
    expect(locked.status).toBe(429);
    expect(locked.html).toContain("Too many failed sign-ins");
    expect(locked.headers.getSetCookie().some((c) => c.startsWith("twistlog_session="))).toBe(
      false,
    );

    // Stored in the database: a fresh server process still refuses.
    const second = await startServer({});
    try {
      const again = new HttpClient(second.url);
      expect((await again.signIn(victim.email, TEST_PASSWORD)).status).toBe(429);
    } finally {
      await second.stop();
    }
    const rows = await db
      .select()
      .from(signInFailures)
      .where(eq(signInFailures.email, victim.email));
    expect(rows).toHaveLength(THROTTLE.perAccount);
  });

  it(`lets at most ${THROTTLE.perAccount} of 40 parallel wrong passwords for one account be checked`, async () => {
    const victim = (await createTestTeam("Race")).accounts.engineer;
    const client = new HttpClient(server.url);
    await client.get("/sign-in");
    const answers = await Promise.all(
      Array.from({ length: 40 }, (_, i) =>
        client.post("/sign-in", { email: victim.email, password: `parallel guess ${i}` }),
      ),
    );
    const checked = answers.filter((a) => a.status === 400);
    const refused = answers.filter((a) => a.status === 429);
    expect(checked.length + refused.length).toBe(40);
    expect(checked.length).toBeLessThanOrEqual(THROTTLE.perAccount);
    for (const a of checked)
      expect(a.html).toContain("The e-mail address or the password is not right.");
    for (const a of refused) expect(a.html).toContain("Too many failed sign-ins");
    // The audit log and the throttle's own rows agree: each checked guess is one failure.
    const failed = await db
      .select({ id: auditEvents.id })
      .from(auditEvents)
      .where(
        and(eq(auditEvents.action, "sign-in-failed"), eq(auditEvents.actorEmail, victim.email)),
      );
    expect(failed).toHaveLength(checked.length);
    const rows = await db
      .select()
      .from(signInFailures)
      .where(eq(signInFailures.email, victim.email));
    expect(rows).toHaveLength(checked.length);
  });

  it(`throttles an address after ${THROTTLE.perAddress} failures, whichever accounts it tries`, async () => {
    const client = new HttpClient(server.url);
    for (let i = 0; i < THROTTLE.perAddress; i++) {
      expect((await client.signIn(`spray-${i}-${Date.now()}@example.test`, "guess")).status).toBe(
        400,
      );
    }
    expect((await client.signIn(team.accounts.technician.email, TEST_PASSWORD)).status).toBe(429);
    // Another address still signs the same account in.
    expect(
      (await new HttpClient(server.url).signIn(team.accounts.technician.email, TEST_PASSWORD))
        .status,
    ).toBe(302);
    const logged = await db
      .select({ ip: auditEvents.ip })
      .from(auditEvents)
      .where(
        and(
          eq(auditEvents.action, "sign-in-throttled"),
          eq(auditEvents.actorEmail, team.accounts.technician.email),
        ),
      );
    expect(logged.map((l) => l.ip)).toContain(client.ip);
  });

  it("an unknown e-mail is throttled the same way, so the lock reveals nothing", async () => {
    const client = new HttpClient(server.url);
    const email = `ghost-${Date.now()}@example.test`;
    for (let i = 0; i < THROTTLE.perAccount; i++) await client.signIn(email, `guess ${i}`);
    expect((await client.signIn(email, "anything")).status).toBe(429);
  });
});

describe("sessions", () => {
  it("are listed on the account page, and ending one signs that browser out", async () => {
    const own = (await createTestTeam("Sessions")).accounts.viewer;
    const laptop = new HttpClient(server.url);
    const workshop = new HttpClient(server.url);
    await laptop.signIn(own.email, TEST_PASSWORD);
    await workshop.signIn(own.email, TEST_PASSWORD);
    const page = await laptop.get("/account");
    const ids = [...page.html.matchAll(/name="sessionId" value="([0-9a-f]{64})"/g)].map(
      (m) => m[1],
    );
    expect(ids).toHaveLength(2);
    expect(page.html).toContain(workshop.ip);
    expect(page.html).toContain(laptop.ip);
    const ended = await laptop.post("/account", { intent: "revoke-others" });
    expect(ended.status).toBe(200);
    expect((await workshop.get("/team")).status).toBe(302);
    expect((await laptop.get("/team")).status).toBe(200);
    // Another user's session id matches nothing: 404, and it stays.
    const stranger = new HttpClient(server.url);
    await stranger.signIn(team.accounts.engineer.email, TEST_PASSWORD);
    await stranger.get("/account");
    const [mine] = await db
      .select({ id: sessions.id })
      .from(sessions)
      .where(eq(sessions.userId, own.id));
    expect(
      (await stranger.post("/account", { intent: "revoke", sessionId: mine!.id })).status,
    ).toBe(404);
    expect((await laptop.get("/team")).status).toBe(200);
  });
});

describe("bad input at sign-in changes nothing", () => {
  it("an overlong e-mail and password get 400 with a message naming the limit", async () => {
    const client = new HttpClient(server.url);
    const r = await client.signIn(`${"a".repeat(300)}@example.test`, "x".repeat(5000));
    expect(r.status).toBe(400);
    expect(r.html).toContain("An e-mail address has at most 254 characters.");
    expect(r.html).toContain("A password has at most 200 characters.");
    const failures = await db
      .select()
      .from(signInFailures)
      .where(eq(signInFailures.email, `${"a".repeat(300)}@example.test`));
    expect(failures).toEqual([]);
  });

  it("a malformed e-mail gets 400 and a message next to the field", async () => {
    const client = new HttpClient(server.url);
    const r = await client.signIn("not-an-address", "whatever");
    expect(r.status).toBe(400);
    expect(r.html).toMatch(
      /id="sign-in-email"[^>]*aria-invalid="true"|aria-invalid="true"[^>]*id="sign-in-email"/,
    );
    expect(r.html).toContain("That is not an e-mail address");
    expect(r.html).toMatch(/aria-describedby="sign-in-email-error"/);
  });

  it("a missing CSRF token gets 403 and signs nobody in", async () => {
    const client = new HttpClient(server.url);
    await client.get("/sign-in");
    const r = await client.post("/sign-in", {
      email: team.accounts.admin.email,
      password: TEST_PASSWORD,
      csrf: null,
    });
    expect(r.status).toBe(403);
    expect(r.html).toContain("security token was missing");
    expect(r.headers.getSetCookie().some((c) => c.startsWith("twistlog_session="))).toBe(false);
  });

  it("a tampered session cookie counts as signed out (redirect for pages, 401 for posts)", async () => {
    const client = new HttpClient(server.url);
    await client.signIn(team.accounts.admin.email, TEST_PASSWORD);
    const value = client.cookies.get("twistlog_session")!;
    // Flip one character of the signed value: the signature no longer matches.
    const flipped = value.slice(0, 5) + (value[5] === "A" ? "B" : "A") + value.slice(6);
    client.cookies.set("twistlog_session", flipped);
    const page = await client.get("/team");
    expect(page.status).toBe(302);
    expect(page.headers.get("location")).toMatch(/^\/sign-in/);
    const post = await client.post("/team", { intent: "set-units", unit: "rad/s" });
    expect(post.status).toBe(401);
  });
});
