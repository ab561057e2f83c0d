import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { invitations, memberships, sessions, users } from "~/lib/infra/db/schema";
import { db, pool } from "~/lib/infra/db.server";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { HttpClient, linkIn, newestMailTo } from "../support/http-client";
import { startServer } from "../support/processes";

// Invitations and password resets by e-mail: the production server sends through nodemailer to
// its own fake SMTP server, which stores .eml files; the tests read them back with mailparser.
let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
beforeAll(async () => {
  [server, team] = await Promise.all([startServer({}), createTestTeam("Mail")]);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
});

function signedIn(email: string, password = TEST_PASSWORD) {
  return HttpClient.signedIn(server.url, email, password);
}

describe("invitations", () => {
  it("an admin's invitation arrives by e-mail, its link makes an account in the team, and works once only", async () => {
    const admin = await signedIn(team.accounts.admin.email);
    await admin.get("/team");
    const invitee = `new-${Date.now()}@example.test`;
    const sent = await admin.post("/team", {
      intent: "invite",
      email: invitee,
      role: "technician",
    });
    expect(sent.status).toBe(200);
    expect(sent.html).toContain(`Invitation sent to ${invitee}.`);

    const mail = await newestMailTo(server.mailDir, invitee);
    expect(mail.subject).toBe(`You are invited to ${team.name} on Twistlog`);
    const link = linkIn(mail.text, `${server.url}/invitations/`);
    // 32 random bytes, base64url: 43 characters, 256 bits.
    expect(link.split("/").pop()).toMatch(/^[A-Za-z0-9_-]{43}$/);
    const [stored] = await db.select().from(invitations).where(eq(invitations.email, invitee));
    expect(stored?.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(stored?.tokenHash).not.toContain(link.split("/").pop());

    const guest = new HttpClient(server.url);
    const path = new URL(link).pathname;
    const page = await guest.get(path);
    expect(page.html, page.html.slice(0, 3000)).toContain(`Join ${team.name}`);
    const accepted = await guest.post(path, {
      name: "New Colleague",
      password: "a long new password",
    });
    expect(accepted.status).toBe(302);
    expect(accepted.headers.get("location")).toBe("/team");
    const teamPage = await guest.get("/team");
    expect(teamPage.status).toBe(200);
    expect(teamPage.html).toContain("You are Technician in this team.");

    // Second use: the page says so, and a post changes nothing.
    expect((await new HttpClient(server.url).get(path)).html).toContain(
      "This invitation no longer works",
    );
    const reuse = await guest.post(path, { name: "Intruder", password: "another long password" });
    expect(reuse.status).toBe(410);
    const named = await db.select({ name: users.name }).from(users).where(eq(users.email, invitee));
    expect(named).toEqual([{ name: "New Colleague" }]);
  });

  it("a viewer cannot invite (403) and no mail is sent", async () => {
    const viewer = await signedIn(team.accounts.viewer.email);
    await viewer.get("/team");
    const invitee = `blocked-${Date.now()}@example.test`;
    const r = await viewer.post("/team", { intent: "invite", email: invitee, role: "admin" });
    expect(r.status).toBe(403);
    expect(await db.select().from(invitations).where(eq(invitations.email, invitee))).toEqual([]);
    await expect(newestMailTo(server.mailDir, invitee)).rejects.toThrow(/no mail/);
  });

  it("the last admin cannot remove themselves or step down; with a second admin they can", async () => {
    const own = await createTestTeam("Admins");
    const admin = await signedIn(own.accounts.admin.email);
    const path = `/team/members/${own.accounts.admin.membershipId}`;
    await admin.get(path);
    const removal = await admin.post(path, { intent: "remove" });
    expect(removal.status).toBe(400);
    expect(removal.html).toContain("last admin cannot be removed");
    const stepDown = await admin.post(path, { intent: "change-role", role: "viewer" });
    expect(stepDown.status).toBe(400);
    const [still] = await db
      .select({ role: memberships.role })
      .from(memberships)
      .where(eq(memberships.id, own.accounts.admin.membershipId));
    expect(still?.role).toBe("admin");

    const promote = await admin.post(`/team/members/${own.accounts.engineer.membershipId}`, {
      intent: "change-role",
      role: "admin",
    });
    expect(promote.status).toBe(302);
    expect((await admin.post(path, { intent: "remove" })).status).toBe(302);
    expect(
      await db
        .select()
        .from(memberships)
        .where(eq(memberships.id, own.accounts.admin.membershipId)),
    ).toEqual([]);
  });
});

describe("password reset", () => {
  it("the e-mailed link sets a new password once, ends every session, and the old password stops working", async () => {
    const account = team.accounts.engineer;
    const laptop = await signedIn(account.email);
    const workshop = await signedIn(account.email);
    expect((await laptop.get("/team")).status).toBe(200);

    const anon = new HttpClient(server.url);
    await anon.get("/forgot-password");
    const asked = await anon.post("/forgot-password", { email: account.email });
    expect(asked.html).toContain("a link to choose a new password is on its way");
    // The same answer for an address without an account, and no mail for it.
    const unknown = await anon.post("/forgot-password", { email: "nobody-reset@example.test" });
    expect(unknown.html).toContain("a link to choose a new password is on its way");
    await expect(newestMailTo(server.mailDir, "nobody-reset@example.test")).rejects.toThrow(
      /no mail/,
    );

    const mail = await newestMailTo(server.mailDir, account.email);
    const path = new URL(linkIn(mail.text, `${server.url}/reset-password/`)).pathname;
    await anon.get(path);
    const done = await anon.post(path, {
      password: "a brand new password",
      confirm: "a brand new password",
    });
    expect(done.status).toBe(302);
    expect(done.headers.get("location")).toBe("/sign-in?notice=password-changed");

    expect(await db.select().from(sessions).where(eq(sessions.userId, account.id))).toEqual([]);
    for (const client of [laptop, workshop]) {
      const r = await client.get("/team");
      expect(r.status).toBe(302);
      expect(r.headers.get("location")).toMatch(/^\/sign-in/);
    }
    expect((await new HttpClient(server.url).signIn(account.email, TEST_PASSWORD)).status).toBe(
      400,
    );
    expect(
      (await new HttpClient(server.url).signIn(account.email, "a brand new password")).status,
    ).toBe(302);

    // Used once: the link is dead now.
    expect((await new HttpClient(server.url).get(path)).html).toContain(
      "This link no longer works",
    );
    expect(
      (await anon.post(path, { password: "third password here", confirm: "third password here" }))
        .status,
    ).toBe(410);
  });

  it("a reset link older than 30 minutes does not work", async () => {
    const account = team.accounts.technician;
    const anon = new HttpClient(server.url);
    await anon.get("/forgot-password");
    await anon.post("/forgot-password", { email: account.email });
    const mail = await newestMailTo(server.mailDir, account.email);
    const path = new URL(linkIn(mail.text, `${server.url}/reset-password/`)).pathname;
    // Age the link by moving its expiry back, as 31 minutes of waiting would.
    await pool.query(
      "UPDATE password_resets SET expires_at = expires_at - INTERVAL 31 MINUTE WHERE user_id = ?",
      [account.id],
    );
    expect((await anon.get(path)).html).toContain("This link no longer works");
  });
});
