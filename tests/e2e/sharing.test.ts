import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { memberships, users } from "~/lib/infra/db/schema";
import { shares } from "~/lib/infra/db/schema-results";
import { createApiToken } from "~/lib/data/api-tokens.server";
import { db, pool } from "~/lib/infra/db.server";
import { HttpClient, linkIn, newestMailTo } from "../support/http-client";
import { baseUrl, launchBrowser } from "./browser";
import { DEMO_PASSWORD, signIn, snap } from "./sign-in";

// Share links, e-mail and comments (issue 7) in Chromium, against the server at TWISTLOG_BASE_URL
// with the demo data (Kestrel team; its sample drive logs analysed at start-up) and the fake SMTP
// server storing mail in MAIL_DIR. The database is the server's (to move an expiry into the past).

const mailDir = process.env.MAIL_DIR ?? "";
const tag = Date.now().toString(36);
let browser: Browser;
/** A finished demo drive log of KST-D4 (idle), and another one the share link must not reach. */
let vehicleId = 0;
let logId = 0;
let otherLogId = 0;
let logPath = "";

beforeAll(async () => {
  browser = await launchBrowser();
  const page = await signIn(browser, "engineer@twistlog.test");
  const vehicles = (await (await page.request.get(`${baseUrl}/api/v1/vehicles`)).json()) as {
    vehicles: { id: number; identifier: string }[];
  };
  vehicleId = vehicles.vehicles.find((v) => v.identifier === "KST-D4")!.id;
  // The demo logs are analysed in the background after seeding: wait until two are done.
  for (let i = 0; i < 240; i++) {
    const { logs } = (await (
      await page.request.get(`${baseUrl}/api/v1/vehicles/${vehicleId}/logs`)
    ).json()) as {
      logs: { id: number; status: string; condition: string }[];
    };
    const done = logs.filter((l) => l.status === "done");
    const idle = done.find((l) => l.condition === "idle-neutral");
    if (idle && done.length >= 2) {
      logId = idle.id;
      otherLogId = done.find((l) => l.id !== idle.id)!.id;
      break;
    }
    await new Promise((r) => setTimeout(r, 500));
  }
  expect(logId).toBeGreaterThan(0);
  logPath = `/vehicles/${vehicleId}/logs/${logId}`;
  await page.context().close();
});
afterAll(async () => {
  await browser?.close();
  await pool.end();
});

/** The share panel's "Make a share link": returns the URL shown once. */
async function makeLink(page: Page, note: string, days = "7") {
  await page.goto(baseUrl + logPath);
  const panel = page.locator("[data-share-panel]");
  await panel.getByText("Make a share link").click();
  await panel
    .getByLabel(/Works for/)
    .first()
    .fill(days);
  await panel.getByLabel("Note").fill(note);
  await panel.getByRole("button", { name: "Make share link" }).click();
  const shown = panel.getByLabel(/Copy the share link now/);
  await shown.waitFor();
  return shown.inputValue();
}

async function guestPage() {
  return (await browser.newContext()).newPage();
}

/** The text of the page without scripts, i.e. what a reader of the HTML would find. */
async function htmlOf(page: Page) {
  return page.content();
}

describe("share links in the browser", () => {
  let url = "";
  let fileName = "";
  let leastIsolation = "";

  it("an engineer makes a link; a fresh context without a session sees the charts, nothing else of the team", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    await page
      .context()
      .grantPermissions(["clipboard-read", "clipboard-write"], { origin: baseUrl });
    url = await makeLink(page, `Idle with damper A ${tag}`);
    // 32 random bytes in base64url (RFC 4648 §5): 256 bits, above the 128 of RFC 4086 §8 /
    // NIST SP 800-63B §5.1.1.2.
    expect(url).toMatch(new RegExp(`^${baseUrl}/s/[A-Za-z0-9_-]{43}$`));
    // Shown once, focused, and the copy button puts exactly it on the clipboard.
    await expect(page.evaluate(() => document.activeElement?.id)).resolves.toBe(
      "share-created-url",
    );
    await page.getByRole("button", { name: "Copy link" }).click();
    await page.getByText("Copied to the clipboard.").waitFor();
    await expect(page.evaluate(() => navigator.clipboard.readText())).resolves.toBe(url);
    const row = page.locator("[data-share-panel] tr", { hasText: `Idle with damper A ${tag}` });
    await row.getByText("Active").waitFor();
    await snap(page, "share-panel");
    fileName = (await page.getByRole("heading", { level: 1 }).textContent()) ?? "";

    const guest = await guestPage();
    const response = await guest.goto(url);
    expect(response?.status()).toBe(200);
    // Kept out of caches and search engines (RFC 9111 §5.2.2.5; X-Robots-Tag). Referrer-Policy may
    // repeat the app-wide value first; the last recognised token wins (W3C Referrer Policy §11.1).
    const headers = await response!.allHeaders();
    expect(headers["cache-control"]).toBe("no-store");
    expect(headers["x-robots-tag"]).toContain("noindex");
    expect(headers["referrer-policy"]!.split(/[,\n]\s*/).pop()).toBe("no-referrer");
    await guest.getByText("Shared by Erik Engineer").waitFor();
    await guest.getByText(`Idle with damper A ${tag}`).waitFor();
    await guest.getByText("Kestrel estate 2.0 diesel (KST-D4)").waitFor();
    await expect(guest.getByRole("heading", { level: 1 }).textContent()).resolves.toBe(fileName);
    // The charts draw from the share's own JSON: canvases inside the chart figures.
    const iso = guest.locator('[data-chart="isolation-curve"][data-status="ready"]');
    await iso.locator("canvas").first().waitFor({ timeout: 30_000 });
    await guest.locator('[data-chart="speed-trace"] canvas').first().waitFor();
    await guest.getByRole("complementary", { name: "About these verdicts" }).waitFor();
    leastIsolation =
      (await guest
        .locator("section", { hasText: "Isolation at the firing order" })
        .locator(".text-2xl")
        .first()
        .textContent()) ?? "";
    expect(leastIsolation).toMatch(/dB$/);
    // No navigation to anything of the team: no app header, no link outside this share (the
    // skip link "#main" stays on the page).
    const hrefs = await guest
      .locator("a[href]")
      .evaluateAll((as) => as.map((a) => a.getAttribute("href")));
    expect(hrefs).toContain("#main");
    expect(hrefs.filter((h) => h !== "#main" && !h!.startsWith(new URL(url).pathname))).toEqual([]);
    await expect(guest.getByRole("button", { name: "Sign out" }).count()).resolves.toBe(0);
    await expect(guest.getByRole("link", { name: "Vehicles" }).count()).resolves.toBe(0);
    // Nothing of the raw file unless the sharer allowed it.
    await expect(guest.getByText("Download the raw file").count()).resolves.toBe(0);
    await snap(guest, "share-page");

    // The share's JSON serves its own drive log only.
    const own = await guest.request.get(`${url}/charts.json`);
    expect(own.status()).toBe(200);
    expect(((await own.json()) as { logId: number }).logId).toBe(logId);
    expect((await guest.request.get(`${url}/charts.json?log=${otherLogId}`)).status()).toBe(404);
    expect((await guest.request.get(`${url}/curves.json?logs=${otherLogId}`)).status()).toBe(404);
    expect((await guest.request.get(`${url}/file`)).status()).toBe(403);
    // The team's own JSON without a session: sent to the sign-in, no data.
    const team = await guest.request.get(
      `${baseUrl}/vehicles/${vehicleId}/logs/${otherLogId}/charts.json`,
      {
        maxRedirects: 0,
      },
    );
    expect(team.status()).toBe(302);
    expect(team.headers().location).toMatch(/^\/sign-in/);
    const api = await guest.request.get(`${baseUrl}/api/v1/logs/${otherLogId}/result`);
    expect(api.status()).toBe(401);

    // The view was counted (time only): the panel shows 1 view.
    await page.reload();
    await page
      .locator("[data-share-panel] tr", { hasText: `Idle with damper A ${tag}` })
      .locator("td")
      .nth(4)
      .getByText(/^1/)
      .waitFor();
    await guest.context().close();
    await page.context().close();
  });

  it("after revocation the same link shows the unavailable page (410) with no data in the HTML or JSON", async () => {
    expect(url).not.toBe("");
    const page = await signIn(browser, "engineer@twistlog.test");
    await page.goto(baseUrl + logPath);
    const row = page.locator("[data-share-panel] tr", { hasText: `Idle with damper A ${tag}` });
    await row.getByRole("button", { name: "Revoke…" }).click();
    await row.getByRole("button", { name: "Yes, revoke" }).click();
    await row.getByText("Revoked", { exact: true }).waitFor();
    await page.context().close();

    const guest = await guestPage();
    const response = await guest.goto(url);
    // RFC 9110 §15.5.11: 410 Gone — it existed and is no longer available.
    expect(response?.status()).toBe(410);
    expect((await response!.allHeaders())["cache-control"]).toBe("no-store");
    await guest.getByRole("heading", { name: "This link is no longer available." }).waitFor();
    const html = await htmlOf(guest);
    for (const secret of [
      fileName,
      "Kestrel estate",
      "KST-D4",
      `Idle with damper A ${tag}`,
      leastIsolation,
      "Erik Engineer",
    ])
      expect(html).not.toContain(secret);
    const json = await guest.request.get(`${url}/charts.json`);
    expect(json.status()).toBe(410);
    expect(await json.json()).toEqual({
      error: { code: "share_unavailable", message: "This link is no longer available." },
    });
    await snap(guest, "share-unavailable");
    await guest.context().close();
  });

  it("an expired link is 410 too; a guessed or altered token is 404", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    // The API with the session cookie, as the app's own pages call it (Origin is our own).
    const made = await page.request.post(`${baseUrl}/api/v1/logs/${logId}/shares`, {
      data: { expiresInDays: 1, note: `expiring ${tag}` },
      headers: { Origin: baseUrl },
    });
    expect(made.status()).toBe(201);
    const { share } = (await made.json()) as { share: { id: number; url: string } };
    const guest = await guestPage();
    expect((await guest.goto(share.url))?.status()).toBe(200);
    await db
      .update(shares)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(shares.id, share.id));
    expect((await guest.goto(share.url))?.status()).toBe(410);
    await guest.getByRole("heading", { name: "This link is no longer available." }).waitFor();
    expect(await htmlOf(guest)).not.toContain(`expiring ${tag}`);

    const token = share.url.split("/s/")[1]!;
    const altered = token.slice(0, 10) + (token[10] === "x" ? "y" : "x") + token.slice(11);
    // RFC 9110 §15.5.5: 404 — no such link, and nothing about whether one existed.
    for (const t of [altered, "guessed-token", "A".repeat(43)]) {
      const r = await guest.goto(`${baseUrl}/s/${t}`);
      expect(r?.status()).toBe(404);
      await guest
        .getByRole("heading", { name: "There is no share link at this address." })
        .waitFor();
    }
    await guest.context().close();
    await page.context().close();
  });

  it("send by e-mail: the mail arrives at the fake SMTP server and its link works; a member gets the normal link", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    await page.goto(baseUrl + logPath);
    const panel = page.locator("[data-share-panel]");
    await panel.getByText("Send by e-mail").click();
    const guestAddress = `supplier-${tag}@example.test`;
    await panel.getByLabel("E-mail addresses").fill(`${guestAddress}, technician@twistlog.test`);
    await panel.getByLabel("Message").fill("Please check the idle isolation.");
    await panel.getByRole("button", { name: "Send" }).click();
    await panel
      .getByText("Sent to 2 addresses: 1 with a share link, 1 team member with the normal link.")
      .waitFor();

    const mail = await newestMailTo(mailDir, guestAddress);
    expect(mail.subject).toBe("Erik Engineer shared a drive log with you on Twistlog");
    const link = linkIn(mail.text, `${baseUrl}/s/`);
    const guest = await guestPage();
    expect((await guest.goto(link))?.status()).toBe(200);
    await guest.getByText("Please check the idle isolation.").waitFor();
    await guest
      .locator('[data-chart="isolation-curve"][data-status="ready"] canvas')
      .first()
      .waitFor({ timeout: 30_000 });
    const member = await newestMailTo(mailDir, "technician@twistlog.test");
    expect(linkIn(member.text, baseUrl)).toBe(`${baseUrl}${logPath}`);
    await guest.context().close();
    await page.context().close();
  });

  it("a viewer and a technician cannot make share links: no panel, page action 403, API 403", async () => {
    for (const email of ["viewer@twistlog.test", "technician@twistlog.test"]) {
      const page = await signIn(browser, email);
      await page.goto(baseUrl + logPath);
      await page.getByRole("heading", { level: 1 }).waitFor();
      await expect(page.locator("[data-share-panel]").count()).resolves.toBe(0);
      await page.context().close();

      const client = new HttpClient(baseUrl);
      expect((await client.signIn(email, DEMO_PASSWORD)).status).toBe(302);
      await client.get(logPath);
      expect(client.csrf).not.toBe("");
      const r = await client.post(`${logPath}/share`, { intent: "create", expiresInDays: "14" });
      expect(r.status).toBe(403);
    }
    // The demo viewer and their team, for an API token of their own.
    const [viewer] = await db
      .select({ id: users.id, teamId: memberships.teamId })
      .from(users)
      .innerJoin(memberships, eq(memberships.userId, users.id))
      .where(eq(users.email, "viewer@twistlog.test"));
    const token = await createApiToken({
      userId: viewer!.id,
      teamId: viewer!.teamId,
      name: `e2e ${tag}`,
      expiresAt: null,
    });
    const api = await fetch(`${baseUrl}/api/v1/logs/${logId}/shares`, {
      method: "POST",
      headers: { Authorization: `Bearer ${token.token}`, "Content-Type": "application/json" },
      body: "{}",
    });
    expect(api.status).toBe(403);
    expect(((await api.json()) as { error: { code: string } }).error.code).toBe("forbidden");
  });
});

describe("a comparison's share link in the browser", () => {
  it("shows the compared drive logs with their overlays, and its curves JSON answers only the shared logs", async () => {
    const engineer = new HttpClient(baseUrl);
    expect((await engineer.signIn("engineer@twistlog.test", DEMO_PASSWORD)).status).toBe(302);
    await engineer.get(logPath);
    const made = await engineer.post(`/vehicles/${vehicleId}/compare/share`, {
      intent: "create",
      logs: `${logId},${otherLogId}`,
      expiresInDays: "2",
      note: `comparison ${tag}`,
    });
    expect(made.status).toBe(201);
    const { created } = JSON.parse(made.html) as { created: { url: string } };
    const guest = await guestPage();
    expect((await guest.goto(created.url))?.status()).toBe(200);
    await guest
      .getByRole("heading", { level: 1, name: /Comparison on Kestrel estate 2\.0 diesel/ })
      .waitFor();
    await guest.getByText(`comparison ${tag}`).waitFor();
    await guest
      .locator('[data-chart="overlay-isolation"][data-status="ready"] canvas')
      .first()
      .waitFor({ timeout: 30_000 });
    await expect(guest.locator("[data-shared-log]").count()).resolves.toBe(2);
    const hrefs = await guest
      .locator("a[href]")
      .evaluateAll((as) => as.map((a) => a.getAttribute("href")));
    expect(
      hrefs.filter((h) => h !== "#main" && !h!.startsWith(new URL(created.url).pathname)),
    ).toEqual([]);
    await snap(guest, "share-comparison");
    const curves = await guest.request.get(`${created.url}/curves.json`);
    expect(
      ((await curves.json()) as { curves: { logId: number }[] }).curves.map((c) => c.logId),
    ).toEqual([logId, otherLogId]);
    // A drive log of the vehicle outside the comparison: refused.
    const { logs } = (await (
      await fetch(`${baseUrl}/api/v1/vehicles/${vehicleId}/logs`, {
        headers: { Cookie: engineer.cookieHeader() },
      })
    ).json()) as { logs: { id: number }[] };
    // KST-D4 has more demo drive logs than the two compared (app/demo/demo-drive-logs.server.ts).
    const outside = logs.find((l) => l.id !== logId && l.id !== otherLogId);
    expect(outside).toBeDefined();
    expect(
      (await guest.request.get(`${created.url}/curves.json?logs=${outside!.id}`)).status(),
    ).toBe(404);
    expect(
      (await guest.request.get(`${created.url}/charts.json?log=${outside!.id}`)).status(),
    ).toBe(404);
    await guest.context().close();
  });
});

describe("comments in the browser", () => {
  it("a technician pins a comment to an engine speed; it is listed and drawn as a marker on the speed charts", async () => {
    const page = await signIn(browser, "technician@twistlog.test");
    await page.goto(baseUrl + logPath);
    const panel = page.locator("[data-comments-panel]");
    const body = `A/C compressor engaged ${tag}`;
    await panel.getByLabel("New comment").fill(body);
    await panel.getByLabel("Pin to").selectOption("rpm");
    // Outside the recorded speed range: a field error tied to the field.
    await panel.getByLabel(/Engine speed/).fill("9000");
    await panel.getByRole("button", { name: "Post comment" }).click();
    const field = panel.getByLabel(/Engine speed/);
    await expect.poll(() => field.getAttribute("aria-invalid")).toBe("true");
    await panel.getByText(/pin to an engine speed in that range/).waitFor();
    // The demo idle log idles near 800 rpm (samples/README.md).
    await field.fill("800");
    await panel.getByRole("button", { name: "Post comment" }).click();
    const item = panel.locator("li", { hasText: body });
    await item.getByText("pinned at 800 rpm").waitFor();
    await snap(page, "comments");
    // The marker: the speed charts' legend names the comment marker once markers reach them.
    await page
      .locator('[data-chart="isolation-curve"][data-status="ready"]')
      .getByText("Comment", { exact: true })
      .waitFor({ timeout: 30_000 });
    await item.getByRole("button", { name: /Delete/ }).click();
    await item.waitFor({ state: "detached" });
    await page.context().close();
  });
});
