import mysql from "mysql2/promise";
import nodemailer from "nodemailer";
import { randomBytes } from "node:crypto";
import { mkdtempSync } from "node:fs";
import { rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { applyMigrations } from "~/lib/infra/db/migrate.server";
import { pool } from "~/lib/infra/db.server";
import { connectionOptions } from "~/lib/infra/db-options.server";
import { getEnv } from "~/lib/infra/env.server";
import { readStoredMail, startFakeSmtp } from "~/lib/infra/fake-smtp.server";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { HttpClient } from "../support/http-client";
import { freePort, runTs, startServer } from "../support/processes";

// Security headers, the audit log, the demo seed, settings and the fake mail server.
let server: Awaited<ReturnType<typeof startServer>>;
let team: TestTeam;
beforeAll(async () => {
  [server, team] = await Promise.all([startServer({}), createTestTeam("Platform")]);
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
});

describe("security headers", () => {
  it("every page has a nonce CSP, frame-ancestors 'none', DENY, nosniff and a same-origin referrer", async () => {
    const r = await fetch(`${server.url}/sign-in`);
    const csp = r.headers.get("content-security-policy") ?? "";
    const nonce = /'nonce-([^']+)'/.exec(csp)?.[1];
    expect(nonce).toBeTruthy();
    expect(csp).toContain("frame-ancestors 'none'");
    expect(csp).toContain("object-src 'none'");
    expect(csp).not.toContain("unsafe-inline");
    expect(r.headers.get("x-frame-options")).toBe("DENY");
    expect(r.headers.get("x-content-type-options")).toBe("nosniff");
    expect(r.headers.get("referrer-policy")).toBe("same-origin");
    // Every inline script carries this response's nonce; a second response has another one.
    const html = await r.text();
    const scripts = html.match(/<script\b[^>]*>/g) ?? [];
    expect(scripts.length).toBeGreaterThan(0);
    for (const tag of scripts) expect(tag).toContain(`nonce="${nonce}"`);
    const again = (await fetch(`${server.url}/sign-in`)).headers.get("content-security-policy");
    expect(again).not.toContain(nonce!);
  });

  it("with an https APP_URL the cookies are Secure and HSTS is sent", async () => {
    const https = await startServer({
      APP_URL: "https://twistlog.example",
      SESSION_SECRET: randomBytes(24).toString("hex"),
    });
    try {
      const r = await fetch(`${https.url}/sign-in`);
      expect(r.headers.get("strict-transport-security")).toMatch(/max-age=\d+/);
      expect(r.headers.getSetCookie().find((c) => c.startsWith("twistlog_csrf="))).toMatch(
        /; Secure/i,
      );
    } finally {
      await https.stop();
    }
  });

  it("an https APP_URL with the development secret refuses to start, in one line", async () => {
    const result = await runTs("server/index.ts", {
      NODE_ENV: "production",
      APP_URL: "https://twistlog.example",
    });
    expect(result.code).toBe(1);
    expect(result.stderr.trim()).toMatch(
      /^SESSION_SECRET is not valid \(set a secret of your own for a public APP_URL\)/,
    );
  });
});

describe("audit log", () => {
  it("records sign-ins, failures, invitations, role changes and tokens with the address; admins read it", async () => {
    const admin = new HttpClient(server.url);
    await new HttpClient(server.url, admin.ip).signIn(team.accounts.admin.email, "wrong password");
    await admin.signIn(team.accounts.admin.email, TEST_PASSWORD);
    await admin.get("/team");
    await admin.post("/team", {
      intent: "invite",
      email: `audit-${Date.now()}@example.test`,
      role: "viewer",
    });
    await admin.get(`/team/members/${team.accounts.viewer.membershipId}`);
    await admin.post(`/team/members/${team.accounts.viewer.membershipId}`, {
      intent: "change-role",
      role: "technician",
    });
    await admin.get("/account/tokens");
    const made = await admin.post("/account/tokens", {
      intent: "create",
      name: "audit token",
      expires: "30",
    });
    const tokenId = /name="tokenId" value="(\d+)"/.exec(made.html)?.[1];
    await admin.post("/account/tokens", { intent: "revoke", tokenId: tokenId! });

    const log = await admin.get("/team/audit");
    expect(log.status).toBe(200);
    for (const what of [
      "Signed in",
      "Failed sign-in",
      "Sent an invitation",
      "Changed a role",
      "Created an API token",
      "Revoked an API token",
    ]) {
      expect(log.html).toContain(what);
    }
    expect(log.html).toContain(`${team.accounts.viewer.email}: viewer → technician`);
    expect(log.html).toContain(admin.ip);

    const viewer = new HttpClient(server.url);
    await viewer.signIn(team.accounts.engineer.email, TEST_PASSWORD);
    expect((await viewer.get("/team/audit")).status).toBe(403);
  });
});

describe("demo seed", () => {
  it("creates the Kestrel team with one account per role and a second team; a second run changes nothing", async () => {
    const env = getEnv();
    const database = `${env.DATABASE_NAME}_s${randomBytes(4).toString("hex")}`;
    const admin = await mysql.createConnection({ ...connectionOptions(env), database: undefined });
    try {
      await admin.query(`CREATE DATABASE \`${database}\``);
      await applyMigrations({ ...connectionOptions(env), database });
      const seedEnv = {
        DATABASE_NAME: database,
        TWISTLOG_STORAGE_DIR: join(tmpdir(), `twistlog-seed-${database}`),
      };
      const first = await runTs("scripts/seed.ts", seedEnv);
      expect(first.code).toBe(0);
      expect(first.stdout).toContain("admin@twistlog.test");
      const counts = async () => {
        const [rows] = await admin.query<mysql.RowDataPacket[]>(
          `SELECT (SELECT COUNT(*) FROM \`${database}\`.teams) t, (SELECT COUNT(*) FROM \`${database}\`.users) u, (SELECT COUNT(*) FROM \`${database}\`.memberships) m, (SELECT GROUP_CONCAT(password_hash) FROM \`${database}\`.users) h, (SELECT COUNT(*) FROM \`${database}\`.vehicles) v, (SELECT COUNT(*) FROM \`${database}\`.drive_logs) l, (SELECT COUNT(*) FROM \`${database}\`.analysis_jobs WHERE status = 'queued') q`,
        );
        return rows[0];
      };
      const before = await counts();
      // Two demo vehicles with four sample drive logs each, queued for analysis (samples/README.md).
      expect(before).toMatchObject({ t: 2, u: 5, m: 5, v: 2, l: 8, q: 8 });
      const [roles] = await admin.query<mysql.RowDataPacket[]>(
        `SELECT u.email, m.role, t.name FROM \`${database}\`.memberships m JOIN \`${database}\`.users u ON u.id = m.user_id JOIN \`${database}\`.teams t ON t.id = m.team_id ORDER BY u.email`,
      );
      expect(roles.map((r) => `${r.email} ${r.role} ${r.name}`)).toEqual([
        "admin@twistlog.test admin Kestrel Driveline Test",
        "engineer@twistlog.test engineer Kestrel Driveline Test",
        "other@twistlog.test engineer Harrier Gearbox Rig",
        "technician@twistlog.test technician Kestrel Driveline Test",
        "viewer@twistlog.test viewer Kestrel Driveline Test",
      ]);
      const second = await runTs("scripts/seed.ts", seedEnv);
      expect(second.stdout).toContain("nothing changed");
      expect(await counts()).toEqual(before);
      const refused = await runTs("scripts/seed.ts", {
        DATABASE_NAME: database,
        SMTP_URL: "smtp://mail.example:587",
        APP_URL: "http://localhost:3000",
      });
      expect(refused.code).toBe(1);
      expect(refused.stderr).toContain("SMTP_URL is set");
    } finally {
      await admin.query(`DROP DATABASE IF EXISTS \`${database}\``);
      await admin.end();
      await rm(join(tmpdir(), `twistlog-seed-${database}`), { recursive: true, force: true });
    }
  });
});

describe("the local fake SMTP server", () => {
  it("stores a message sent by nodemailer as .eml that mailparser reads back", async () => {
    const port = await freePort();
    const dir = mkdtempSync(join(tmpdir(), "twistlog-smtp-"));
    const smtp = await startFakeSmtp({ port, dir });
    try {
      const transport = nodemailer.createTransport({
        host: "127.0.0.1",
        port,
        secure: false,
        ignoreTLS: true,
      });
      await transport.sendMail({
        from: "a@example.test",
        to: "b@example.test",
        subject: "Kestrel run-up",
        text: "Link: http://x/y",
      });
      const [mail] = await readStoredMail(dir);
      expect(mail).toMatchObject({ to: "b@example.test", subject: "Kestrel run-up" });
      expect(mail?.text.trim()).toBe("Link: http://x/y");
    } finally {
      await smtp.close();
    }
  });
});
