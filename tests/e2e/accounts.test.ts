import { eq } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { memberships, users } from "~/lib/infra/db/schema";
import { db, pool } from "~/lib/infra/db.server";
import { THROTTLE } from "~/lib/infra/throttle.server";
import { createTestTeam, TEST_PASSWORD } from "../support/accounts";
import { linkIn, newestMailTo } from "../support/http-client";
import { baseUrl, launchBrowser } from "./browser";
import { signIn, signOut, snap } from "./sign-in";

// Accounts in Chromium against the production server that scripts/test.sh runs (demo data
// seeded, fake SMTP server storing mail in MAIL_DIR).
const mailDir = process.env.MAIL_DIR ?? "";
let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await pool.end();
});

describe("sign-in in the browser", () => {
  it.each([
    ["admin@twistlog.test", "Admin"],
    ["engineer@twistlog.test", "Engineer"],
    ["technician@twistlog.test", "Technician"],
    ["viewer@twistlog.test", "Viewer"],
  ])("%s signs in, sees the Kestrel team with the role %s, and signs out", async (email, role) => {
    const page = await signIn(browser, email);
    expect(new URL(page.url()).pathname).toBe("/vehicles");
    await page.goto(`${baseUrl}/team`);
    await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toBe(
      "Kestrel Driveline Test",
    );
    await expect(page.getByText(`You are ${role} in this team.`).count()).resolves.toBe(1);
    if (role === "Admin") await snap(page, "team-admin");
    await signOut(page);
    await expect(page.getByRole("status").textContent()).resolves.toBe("You are signed out.");
    await page.goto(`${baseUrl}/team`);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await page.context().close();
  });

  it("a wrong password is refused without saying which part was wrong, and the message gets focus", async () => {
    const page = await (await browser.newContext()).newPage();
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail address").fill("engineer@twistlog.test");
    await page.getByLabel("Password").fill("not-the-password");
    await page.getByRole("button", { name: "Sign in" }).click();
    const alert = page.getByRole("alert");
    await alert.waitFor();
    await expect(alert.textContent()).resolves.toBe(
      "The e-mail address or the password is not right.",
    );
    await expect(page.evaluate(() => document.activeElement?.getAttribute("role"))).resolves.toBe(
      "alert",
    );
    await snap(page, "sign-in-refused");
    await page.context().close();
  });

  it("empty fields: messages tied to the fields with aria-describedby, focus on the first", async () => {
    const page = await (await browser.newContext()).newPage();
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByRole("button", { name: "Sign in" }).click();
    const email = page.getByLabel("E-mail address");
    await expect(email.getAttribute("aria-invalid")).resolves.toBe("true");
    const describedBy = await email.getAttribute("aria-describedby");
    await expect(page.locator(`[id="${describedBy}"]`).textContent()).resolves.toBe(
      "Enter an e-mail address.",
    );
    await expect(page.evaluate(() => document.activeElement?.id)).resolves.toBe("sign-in-email");
    await snap(page, "sign-in-empty");
    await page.context().close();
  });

  it(`after ${THROTTLE.perAccount} failures the account is throttled, even with the right password`, async () => {
    const { accounts } = await createTestTeam("Browser throttle");
    const page = await (await browser.newContext()).newPage();
    await page.goto(`${baseUrl}/sign-in`);
    for (let i = 0; i <= THROTTLE.perAccount; i++) {
      await page.getByLabel("E-mail address").fill(accounts.viewer.email);
      await page
        .getByLabel("Password")
        .fill(i === THROTTLE.perAccount ? TEST_PASSWORD : `guess-${i}`);
      const answer = page.waitForResponse((r) => r.request().method() === "POST");
      await page.getByRole("button", { name: "Sign in" }).click();
      expect((await answer).status()).toBe(i === THROTTLE.perAccount ? 429 : 400);
    }
    await expect(page.getByRole("alert").textContent()).resolves.toMatch(
      /^Too many failed sign-ins/,
    );
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await page.context().close();
  });
});

describe("invitations and password reset by e-mail", () => {
  it("an invitation e-mail reaches the fake SMTP server, its link works once, and the outbox shows it", async () => {
    const admin = await signIn(browser, "admin@twistlog.test");
    await admin.goto(`${baseUrl}/team`);
    const invitee = `colleague-${Date.now()}@example.test`;
    const invite = admin.getByRole("region", { name: "Invite a colleague" });
    await invite.getByLabel("E-mail address").fill(invitee);
    await invite.getByLabel("Role").selectOption("technician");
    await invite.getByRole("button", { name: "Send invitation" }).click();
    await admin.getByText(`Invitation sent to ${invitee}.`).waitFor();
    await snap(admin, "team-invited");

    const mail = await newestMailTo(mailDir, invitee);
    const link = linkIn(mail.text, `${baseUrl}/invitations/`);
    await admin.goto(`${baseUrl}/outbox`);
    await expect(admin.getByRole("link", { name: link }).count()).resolves.toBe(1);
    await snap(admin, "outbox");
    await admin.goto(`${baseUrl}/team/audit`);
    await admin.getByRole("cell", { name: `${invitee} as technician` }).waitFor();
    await snap(admin, "audit-log");

    const guest = await (await browser.newContext()).newPage();
    await guest.goto(link);
    await guest.getByLabel("Your name").fill("Nia Newcomer");
    await guest.getByLabel("Choose a password").fill("a long enough password");
    await snap(guest, "accept-invitation");
    await guest.getByRole("button", { name: "Join the team" }).click();
    await guest.waitForURL(`${baseUrl}/team`);
    await guest.getByText("You are Technician in this team.").waitFor();

    const again = await (await browser.newContext()).newPage();
    await again.goto(link);
    await expect(again.getByRole("heading", { level: 1 }).textContent()).resolves.toBe(
      "This invitation no longer works",
    );
    for (const p of [admin, guest, again]) await p.context().close();
  });

  it("a password reset ends the user's other sessions", async () => {
    const { accounts } = await createTestTeam("Browser reset");
    const laptop = await signIn(browser, accounts.engineer.email, TEST_PASSWORD);
    await laptop.goto(`${baseUrl}/account`);
    await expect(laptop.getByRole("heading", { level: 1 }).textContent()).resolves.toBe(
      "Your account",
    );
    await snap(laptop, "account");

    const phone = await (await browser.newContext()).newPage();
    await phone.goto(`${baseUrl}/sign-in`);
    await phone.getByRole("link", { name: "Forgot your password?" }).click();
    await phone.waitForURL(`${baseUrl}/forgot-password`);
    await phone.getByLabel("E-mail address").fill(accounts.engineer.email);
    await phone.getByRole("button", { name: "Send the link" }).click();
    await phone.getByText("Check your e-mail").waitFor();
    const mail = await newestMailTo(mailDir, accounts.engineer.email);
    await phone.goto(linkIn(mail.text, `${baseUrl}/reset-password/`));
    await phone.getByLabel("New password").fill("the new password 2");
    await phone.getByLabel("Repeat it").fill("the new password 2");
    await snap(phone, "reset-password");
    await phone.getByRole("button", { name: "Set the password" }).click();
    await phone.waitForURL(/notice=password-changed/);

    await laptop.reload();
    expect(new URL(laptop.url()).pathname).toBe("/sign-in");
    for (const p of [laptop, phone]) await p.context().close();
  });
});

describe("permissions and isolation in the browser", () => {
  it("a viewer sees no engineer button, and the server answers the viewer's POST with 403", async () => {
    const page = await signIn(browser, "viewer@twistlog.test");
    await page.goto(`${baseUrl}/team`);
    await expect(page.getByRole("button", { name: /Show in/ }).count()).resolves.toBe(0);
    const status = await page.evaluate(async () => {
      const csrf = document.querySelector<HTMLInputElement>('input[name="csrf"]')!.value;
      const body = new URLSearchParams({ csrf, intent: "set-units", unit: "rad/s" });
      return (await fetch("/team", { method: "POST", body })).status;
    });
    expect(status).toBe(403);
    await page.context().close();
  });

  it("a user of one team gets 404 for another team's member record", async () => {
    const [other] = await db
      .select({ id: memberships.id })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(eq(users.email, "other@twistlog.test"));
    const page = await signIn(browser, "admin@twistlog.test");
    const response = await page.goto(`${baseUrl}/team/members/${other!.id}`);
    expect(response?.status()).toBe(404);
    await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toBe("Not found");
    await snap(page, "not-found");
    await page.context().close();
  });

  it("a user in two teams switches between them with the team switcher", async () => {
    const first = await createTestTeam("Alpha");
    const second = await createTestTeam("Beta");
    await db
      .insert(memberships)
      .values({ teamId: second.id, userId: first.accounts.engineer.id, role: "viewer" });
    const page = await signIn(browser, first.accounts.engineer.email, TEST_PASSWORD);
    await page.goto(`${baseUrl}/team`);
    const current = (await page.getByRole("heading", { level: 1 }).textContent()) ?? "";
    const target = current === first.name ? second.name : first.name;
    await page.locator("summary", { hasText: current }).click();
    await snap(page, "team-switcher");
    await page.getByRole("button", { name: new RegExp(target) }).click();
    await page.waitForURL(`${baseUrl}/vehicles`);
    await page.goto(`${baseUrl}/team`);
    await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toBe(target);
    await page.context().close();
  });
});

describe("API tokens made in the browser", () => {
  it("a token from the tokens page works for /api/v1/me, and gets 401 once revoked", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    await page.goto(`${baseUrl}/account/tokens`);
    await page.getByLabel("Name").fill(`bench script ${Date.now()}`);
    await page.getByRole("button", { name: "Create token" }).click();
    const token = ((await page.getByLabel("New API token").textContent()) ?? "").trim();
    expect(token).toMatch(/^twl_/);
    await snap(page, "token-created");
    const me = () =>
      fetch(`${baseUrl}/api/v1/me`, { headers: { Authorization: `Bearer ${token}` } });
    const ok = await me();
    expect(ok.status).toBe(200);
    expect(await ok.json()).toMatchObject({
      user: { email: "engineer@twistlog.test" },
      team: { name: "Kestrel Driveline Test" },
      role: "engineer",
    });

    await page
      .getByRole("button", { name: /^Revoke bench script/ })
      .first()
      .click();
    await page.getByText(/is revoked; requests with it now get 401/).waitFor();
    const refused = await me();
    expect(refused.status).toBe(401);
    expect(await refused.json()).toMatchObject({ error: { code: "unauthorized" } });
    await page.context().close();
  });
});
