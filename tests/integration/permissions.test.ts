import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { invitations, memberships, teams } from "~/lib/infra/db/schema";
import { db, pool } from "~/lib/infra/db.server";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { HttpClient } from "../support/http-client";
import { startServer } from "../support/processes";

// Roles are checked by the server on every action, and one team never sees another's rows.
let server: Awaited<ReturnType<typeof startServer>>;
let kestrel: TestTeam;
let other: TestTeam;
beforeAll(async () => {
  [server, kestrel, other] = await Promise.all([
    startServer({}),
    createTestTeam("Home"),
    createTestTeam("Other"),
  ]);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
});

async function signedIn(email: string) {
  const client = await HttpClient.signedIn(server.url, email, TEST_PASSWORD);
  await client.get("/team");
  return client;
}

const unitOf = async (teamId: number) =>
  (await db.select({ unit: teams.amplitudeUnit }).from(teams).where(eq(teams.id, teamId)))[0]?.unit;

describe("roles are enforced by the server", () => {
  it("a viewer's (and a technician's) POST to the engineer-only action gets 403 and changes nothing", async () => {
    for (const role of ["viewer", "technician"] as const) {
      const client = await signedIn(kestrel.accounts[role].email);
      // The page shows no button for them; the request is made by hand, as an attacker would.
      expect((await client.get("/team")).html).not.toContain('value="set-units"');
      const r = await client.post("/team", { intent: "set-units", unit: "rad/s" });
      expect(r.status).toBe(403);
      expect(r.html).toContain("This needs the Engineer role or higher");
      expect(await unitOf(kestrel.id)).toBe("rpm");
    }
  });

  it("an engineer's same POST is accepted", async () => {
    const own = await createTestTeam("Units");
    const client = await signedIn(own.accounts.engineer.email);
    expect((await client.post("/team", { intent: "set-units", unit: "rad/s" })).status).toBe(200);
    expect(await unitOf(own.id)).toBe("rad/s");
  });

  it("admin-only pages and actions refuse an engineer with 403", async () => {
    const client = await signedIn(kestrel.accounts.engineer.email);
    expect((await client.get("/team/audit")).status).toBe(403);
    expect((await client.get(`/team/members/${kestrel.accounts.viewer.membershipId}`)).status).toBe(
      403,
    );
    const r = await client.post(`/team/members/${kestrel.accounts.viewer.membershipId}`, {
      intent: "change-role",
      role: "admin",
    });
    expect(r.status).toBe(403);
    const [m] = await db
      .select({ role: memberships.role })
      .from(memberships)
      .where(eq(memberships.id, kestrel.accounts.viewer.membershipId));
    expect(m?.role).toBe("viewer");
  });

  it("a signed-out POST gets 401", async () => {
    const anon = new HttpClient(server.url);
    await anon.get("/sign-in");
    expect((await anon.post("/team", { intent: "set-units", unit: "rad/s" })).status).toBe(401);
  });
});

describe("team isolation", () => {
  it("an admin of one team gets 404 for another team's member, to read or to change", async () => {
    const client = await signedIn(kestrel.accounts.admin.email);
    const foreign = other.accounts.viewer.membershipId;
    expect((await client.get(`/team/members/${foreign}`)).status).toBe(404);
    const r = await client.post(`/team/members/${foreign}`, {
      intent: "change-role",
      role: "admin",
    });
    expect(r.status).toBe(404);
    expect((await client.post(`/team/members/${foreign}`, { intent: "remove" })).status).toBe(404);
    const [m] = await db
      .select({ role: memberships.role })
      .from(memberships)
      .where(eq(memberships.id, foreign));
    expect(m?.role).toBe("viewer");
    // Its own member answers 200: the 404 is about the team, not the URL.
    expect((await client.get(`/team/members/${kestrel.accounts.viewer.membershipId}`)).status).toBe(
      200,
    );
  });

  it("another team's invitation cannot be withdrawn (404), and switching into a foreign team is 404", async () => {
    const otherAdmin = await signedIn(other.accounts.admin.email);
    const invitee = `iso-${Date.now()}@example.test`;
    expect(
      (await otherAdmin.post("/team", { intent: "invite", email: invitee, role: "viewer" })).status,
    ).toBe(200);
    const [inv] = await db
      .select({ id: invitations.id })
      .from(invitations)
      .where(eq(invitations.email, invitee));

    const client = await signedIn(kestrel.accounts.admin.email);
    const r = await client.post("/team", {
      intent: "revoke-invitation",
      invitationId: String(inv!.id),
    });
    expect(r.status).toBe(404);
    const [still] = await db
      .select({ revokedAt: invitations.revokedAt })
      .from(invitations)
      .where(eq(invitations.id, inv!.id));
    expect(still?.revokedAt).toBeNull();
    expect((await client.post("/team/switch", { teamId: String(other.id) })).status).toBe(404);
  });

  it("the members list shows only the own team's people", async () => {
    const client = await signedIn(kestrel.accounts.viewer.email);
    const page = await client.get("/team");
    expect(page.html).toContain(kestrel.accounts.admin.email);
    expect(page.html).not.toContain(other.accounts.admin.email);
  });
});

describe("CSRF", () => {
  it("a state-changing post without the token gets 403 and changes nothing", async () => {
    const client = await signedIn(kestrel.accounts.admin.email);
    const invitee = `csrf-${Date.now()}@example.test`;
    const r = await client.post("/team", {
      intent: "invite",
      email: invitee,
      role: "viewer",
      csrf: null,
    });
    expect(r.status).toBe(403);
    expect(r.html).toContain("security token was missing or out of date");
    expect(await db.select().from(invitations).where(eq(invitations.email, invitee))).toEqual([]);
  });

  it("a post from another site's page (foreign Origin) is refused by React Router's Origin check, even with a token", async () => {
    const client = await signedIn(kestrel.accounts.admin.email);
    const invitee = `origin-${Date.now()}@example.test`;
    const r = await client.post(
      "/team",
      { intent: "invite", email: invitee, role: "viewer" },
      { Origin: "https://evil.example" },
    );
    // React Router 7 aborts actions whose Origin differs from the request's (400).
    expect(r.status).toBe(400);
    expect(await db.select().from(invitations).where(eq(invitations.email, invitee))).toEqual([]);
  });

  it("a token from another browser does not fit this browser's cookie", async () => {
    const client = await signedIn(kestrel.accounts.admin.email);
    const stranger = new HttpClient(server.url);
    await stranger.get("/sign-in");
    const r = await client.post("/sign-out", { csrf: stranger.csrf });
    expect(r.status).toBe(403);
    expect((await client.get("/team")).status).toBe(200);
  });

  it("a forged CSRF cookie (bad signature) is refused", async () => {
    const client = await signedIn(kestrel.accounts.admin.email);
    client.cookies.set("twistlog_csrf", "forged.value");
    expect((await client.post("/sign-out", { csrf: "forged" })).status).toBe(403);
  });
});
