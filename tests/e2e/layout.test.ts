import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/lib/infra/db.server";
import { createApiToken } from "~/lib/data/api-tokens.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { vehicleSchema } from "~/lib/domain/vehicle-schema";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { baseUrl, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// Issue 11 §3.4 and §3.11 in Chromium: no page scrolls sideways on a 390 × 844 phone screen, and
// every frame starts with a skip link to <main id="main">. A team of its own (not the demo
// team), with a vehicle, two analysed drive logs (one with a very long file name), an open
// invitation, an API token and a share link, so every table and action bar has content.

const PHONE = { width: 390, height: 844 };
const LONG_NAME =
  "kestrel-kst-l9-idle-neutral-warm-engine-ac-off-harness-b-second-sensor-check-2026-11-04-take-07-final.csv";

let browser: Browser;
let team: TestTeam;
let admin: Page;
let vehicleId = 0;
let longLogId = 0;
let shortLogId = 0;
let shareUrl = "";

async function uploadLog(page: Page, name: string, csv: string): Promise<number> {
  // The API with the session cookie, as the app's own pages call it (Origin is our own).
  const r = await page.request.post(`${baseUrl}/api/v1/vehicles/${vehicleId}/logs`, {
    multipart: {
      condition: "idle-neutral",
      file: { name, mimeType: "text/csv", buffer: Buffer.from(csv) },
    },
    headers: { Origin: baseUrl },
  });
  expect(r.status(), await r.text()).toBe(202);
  return ((await r.json()) as { log: { id: number } }).log.id;
}

async function waitForAnalyses(page: Page, ids: number[]) {
  for (let i = 0; i < 240; i++) {
    const r = await page.request.get(`${baseUrl}/api/v1/vehicles/${vehicleId}/logs`);
    const { logs } = (await r.json()) as { logs: { id: number; status: string }[] };
    const mine = logs.filter((l) => ids.includes(l.id));
    if (mine.length === ids.length && mine.every((l) => l.status === "done")) return;
    expect(mine.map((l) => l.status)).not.toContain("failed");
    await page.waitForTimeout(500);
  }
  throw new Error("the drive logs were not analysed within 2 minutes");
}

beforeAll(async () => {
  browser = await launchBrowser();
  team = await createTestTeam("Layout");
  const data = vehicleData(team.id);
  vehicleId = await data.create(
    vehicleSchema.parse({
      name: "Kestrel long-wheelbase estate 2.0 diesel, harness B",
      identifier: "KST-L9-LONG",
      cylinders: 4,
      stroke: 4,
    }),
  );
  admin = await signIn(browser, team.accounts.admin.email, TEST_PASSWORD);
  await admin.setViewportSize(PHONE);
  longLogId = await uploadLog(admin, LONG_NAME, analyticIdleCsv(IDLE_800));
  shortLogId = await uploadLog(
    admin,
    "kestrel-kst-l9-idle-b.csv",
    analyticIdleCsv({ ...IDLE_800, durationS: 8 }),
  );
  await waitForAnalyses(admin, [longLogId, shortLogId]);
  // Content for the other tables: an API token, an open invitation and a share link.
  await createApiToken({
    userId: team.accounts.admin.id,
    teamId: team.id,
    name: "proving-ground upload script of the narrow-screen check",
    expiresAt: null,
  });
  await admin.goto(`${baseUrl}/team`);
  await admin.getByLabel("E-mail address").fill(`invitee-${Date.now()}@example.test`);
  await admin.getByRole("button", { name: "Send invitation" }).click();
  await admin.getByText(/Invitation sent to/).waitFor();
  const share = await admin.request.post(`${baseUrl}/api/v1/logs/${longLogId}/shares`, {
    data: { expiresInDays: 7, note: "Narrow-screen check of the Kestrel L9 idle log." },
    headers: { Origin: baseUrl },
  });
  expect(share.status()).toBe(201);
  shareUrl = ((await share.json()) as { share: { url: string } }).share.url;
}, 180_000);

afterAll(async () => {
  await browser?.close();
  await pool.end();
});

/** Opens a page and waits until its charts (if any) have drawn or failed. */
async function open(page: Page, url: string) {
  const r = await page.goto(url.startsWith("http") ? url : `${baseUrl}${url}`);
  expect(r?.status(), url).toBe(200);
  await page.waitForLoadState("networkidle");
  await page.waitForFunction(
    () => document.querySelectorAll('[data-chart][data-status="loading"]').length === 0,
  );
}

/** The page's scroll width against the viewport: more means the page scrolls sideways. */
const widths = (page: Page) =>
  page.evaluate(() => ({
    scrollWidth: document.documentElement.scrollWidth,
    innerWidth: window.innerWidth,
  }));

describe("390 px wide (issue 11 §3.4)", () => {
  it("no main page scrolls sideways", { timeout: 240_000 }, async () => {
    const logPath = `/vehicles/${vehicleId}/logs/${longLogId}`;
    const pages: [string, string][] = [
      ["start", "/"],
      ["vehicles", "/vehicles"],
      ["vehicle", `/vehicles/${vehicleId}`],
      ["drive-log-long-name", logPath],
      ["rattle", `${logPath}/rattle`],
      ["comparison", `/vehicles/${vehicleId}/compare?logs=${longLogId},${shortLogId}`],
      ["comparisons", "/comparisons"],
      ["team", "/team"],
      ["audit", "/team/audit"],
      ["account", "/account"],
      ["tokens", "/account/tokens"],
    ];
    for (const [name, path] of pages) {
      await open(admin, path);
      const { scrollWidth, innerWidth } = await widths(admin);
      expect(innerWidth).toBe(PHONE.width);
      expect(
        scrollWidth,
        `${path} is ${scrollWidth} px wide at ${innerWidth} px`,
      ).toBeLessThanOrEqual(innerWidth);
      await snap(admin, `phone-${name}`);
    }
    // The signed-out frame and the shared page, in a browser without a session.
    const guest = await (await browser.newContext({ viewport: PHONE })).newPage();
    for (const [name, url] of [
      ["sign-in", `${baseUrl}/sign-in`],
      ["shared-log", shareUrl],
    ] as const) {
      await open(guest, url);
      const { scrollWidth, innerWidth } = await widths(guest);
      expect(
        scrollWidth,
        `${url} is ${scrollWidth} px wide at ${innerWidth} px`,
      ).toBeLessThanOrEqual(innerWidth);
      await snap(guest, `phone-${name}`);
    }
    await guest.context().close();
  });

  it("the drive-log page wraps its long title and keeps its actions on screen", async () => {
    await open(admin, `/vehicles/${vehicleId}/logs/${longLogId}`);
    const title = admin.getByRole("heading", { level: 1, name: LONG_NAME });
    const box = (await title.boundingBox())!;
    expect(box.x + box.width).toBeLessThanOrEqual(PHONE.width);
    // A 100-character name cannot fit on one line of 390 px: it must have wrapped.
    const lineHeight = await title.evaluate((el) => parseFloat(getComputedStyle(el).lineHeight));
    expect(box.height).toBeGreaterThan(1.5 * lineHeight);
    for (const control of [
      admin.getByRole("link", { name: "Result CSV" }),
      admin.getByRole("button", { name: "Compare" }),
    ]) {
      const b = (await control.boundingBox())!;
      expect(b.x).toBeGreaterThanOrEqual(0);
      expect(b.x + b.width).toBeLessThanOrEqual(PHONE.width);
    }
  });

  it("a table too wide for the screen scrolls in its own box, which says so and takes focus", async () => {
    await open(admin, "/team");
    const area = admin.locator('[data-scroll-area="overflowing"]').first();
    await area.waitFor();
    expect(await area.getAttribute("tabindex")).toBe("0");
    expect(await area.getAttribute("role")).toBe("region");
    await admin.getByText("Scroll sideways for more columns →").first().waitFor();
    // The box scrolls, not the page: its content is wider than the box.
    const { inner, outer } = await area.evaluate((el) => ({
      inner: el.scrollWidth,
      outer: el.clientWidth,
    }));
    expect(inner).toBeGreaterThan(outer);
    // Keyboard scrolling: focus the box and press the right arrow.
    await area.focus();
    await admin.keyboard.press("ArrowRight");
    await admin.waitForFunction(
      (el) => (el as HTMLElement).scrollLeft > 0,
      await area.elementHandle(),
    );
  });
});

describe("the skip link (issue 11 §3.11)", () => {
  async function checkSkipLink(page: Page, url: string) {
    await page.goto(url);
    await page.keyboard.press("Tab");
    const focused = await page.evaluate(() => ({
      text: document.activeElement?.textContent,
      href: document.activeElement?.getAttribute("href"),
    }));
    expect(focused, url).toEqual({ text: "Skip to main content", href: "#main" });
    // Visible once focused (it is hidden only until then).
    const box = await page.getByRole("link", { name: "Skip to main content" }).boundingBox();
    expect(box && box.width > 1 && box.height > 1, `${url}: the focused skip link is visible`).toBe(
      true,
    );
    await snap(page, `skip-link-${new URL(url).pathname.split("/")[1] || "start"}`);
    await page.keyboard.press("Enter");
    await page.waitForFunction(() => document.activeElement?.id === "main");
    expect(await page.evaluate(() => document.activeElement?.tagName), url).toBe("MAIN");
    expect(await page.locator("main").count(), `${url} has one <main>`).toBe(1);
  }

  it("is the first Tab stop of the shell, the sign-in frame and the shared page, and Enter moves focus to main", async () => {
    await checkSkipLink(admin, `${baseUrl}/vehicles/${vehicleId}`);
    const guest = await (await browser.newContext()).newPage();
    await checkSkipLink(guest, `${baseUrl}/sign-in`);
    await checkSkipLink(guest, shareUrl);
    await guest.context().close();
  });
});
