import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { freePort, startServer } from "../support/processes";

// The outbox crossed teams: anyone could ask a reset for another team's member and an admin
// read the link on /outbox and take the account over. The production server stores its mail in
// `server.mailDir`; share mail is sent from this process through a fake SMTP server of its own
// that writes into the same folder, so the page reads both.
process.env.FAKE_SMTP_PORT = String(await freePort());
process.env.TWISTLOG_STORAGE_DIR = await mkdtemp(join(tmpdir(), "twistlog-outbox-"));
const { pool } = await import("~/lib/infra/db.server");
const { startFakeSmtp } = await import("~/lib/infra/fake-smtp.server");
const { emailShare } = await import("~/lib/data/share-mail.server");
const { vehicleData } = await import("~/lib/data/vehicles.server");
const { vehicleSchema } = await import("~/lib/domain/vehicle-schema");
const { blobStore } = await import("~/lib/infra/storage-settings.server");
const { createTestTeam, TEST_PASSWORD } = await import("../support/accounts");
const { HttpClient, linkIn, newestMailTo } = await import("../support/http-client");

let server: Awaited<ReturnType<typeof startServer>>;
let smtp: Awaited<ReturnType<typeof startFakeSmtp>>;
let teamA: Awaited<ReturnType<typeof createTestTeam>>;
let teamB: Awaited<ReturnType<typeof createTestTeam>>;
beforeAll(async () => {
  [server, teamA, teamB] = await Promise.all([
    startServer({}),
    createTestTeam("OutboxA"),
    createTestTeam("OutboxB"),
  ]);
  smtp = await startFakeSmtp({ port: Number(process.env.FAKE_SMTP_PORT), dir: server.mailDir });
});
afterAll(async () => {
  await smtp?.close();
  await server?.stop();
  await pool.end();
});

function signedIn(email: string) {
  return HttpClient.signedIn(server.url, email, TEST_PASSWORD);
}

describe("the outbox", () => {
  it("never shows a reset link: not to another team's admin, not to the addressee's own admin", async () => {
    const victim = teamB.accounts.engineer.email;
    const anon = new HttpClient(server.url);
    await anon.get("/forgot-password");
    await anon.post("/forgot-password", { email: victim });
    const link = linkIn(
      (await newestMailTo(server.mailDir, victim)).text,
      `${server.url}/reset-password/`,
    );
    const token = link.split("/").pop()!;

    // Team A sends an invitation of its own, which its admins may read (the control).
    const adminA = await signedIn(teamA.accounts.admin.email);
    await adminA.get("/team");
    const invitee = `outbox-invitee-${Date.now()}@example.test`;
    await adminA.post("/team", { intent: "invite", email: invitee, role: "viewer" });
    const invitation = linkIn(
      (await newestMailTo(server.mailDir, invitee)).text,
      `${server.url}/invitations/`,
    );

    const seenByA = await adminA.get("/outbox");
    expect(seenByA.status).toBe(200);
    expect(seenByA.html).toContain(invitation);
    expect(seenByA.html).not.toContain(token);
    expect(seenByA.html).not.toContain("/reset-password/");
    expect(seenByA.html).not.toContain(victim);
    expect(seenByA.html).not.toContain("Reset your Twistlog password");

    const adminB = await signedIn(teamB.accounts.admin.email);
    const seenByB = await adminB.get("/outbox");
    expect(seenByB.status).toBe(200);
    expect(seenByB.html).not.toContain(token);
    expect(seenByB.html).not.toContain("/reset-password/");
    expect(seenByB.html).toContain(`A password-reset link was sent to ${victim}.`);
    // Team A's invitation is team A's mail.
    expect(seenByB.html).not.toContain(invitation);
    expect(seenByB.html).not.toContain(invitee);
  });

  it("share-link mail of one team is not shown to another team's admin", async () => {
    const data = vehicleData(teamB.id);
    const vehicleId = await data.create(
      vehicleSchema.parse({ name: "Outbox car", identifier: "OBX-1", cylinders: 4, stroke: 4 }),
    );
    const stored = await blobStore().put(
      Readable.from([Buffer.from(analyticIdleCsv({ ...IDLE_800, durationS: 2 }))]),
    );
    const { id: logId } = await data.addLog({
      vehicle: await data.vehicle(vehicleId),
      fileName: "outbox.csv",
      stored,
      metadata: { condition: "idle-neutral", gear: 0, notes: "", testDate: "2026-11-03" },
      uploadedBy: teamB.accounts.technician.id,
    });
    const guest = `outbox-guest-${Date.now()}@supplier.example`;
    const sent = await emailShare({
      teamId: teamB.id,
      teamName: teamB.name,
      caller: { userId: teamB.accounts.engineer.id, role: "engineer", name: "Eng B" },
      subject: { kind: "log", vehicleId, logId },
      recipients: [guest],
      message: "Only for the supplier.",
      expiresInDays: 7,
      allowRawDownload: false,
      origin: server.url,
    });
    expect(sent.guests).toBe(1);
    const shareLink = linkIn((await newestMailTo(server.mailDir, guest)).text, `${server.url}/`);

    const seenByA = await (await signedIn(teamA.accounts.admin.email)).get("/outbox");
    expect(seenByA.status).toBe(200);
    expect(seenByA.html).not.toContain(shareLink);
    expect(seenByA.html).not.toContain(guest);
    expect(seenByA.html).not.toContain("Only for the supplier.");
    // The sending team's admin does see it.
    const seenByB = await (await signedIn(teamB.accounts.admin.email)).get("/outbox");
    expect(seenByB.html).toContain(shareLink);
  });
});
