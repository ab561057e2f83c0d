import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { baseUrl, freshTag, launchBrowser } from "./browser";
import { apiJson, type DemoLog } from "./demo-logs";
import { DEMO_PASSWORD, signIn, snap } from "./sign-in";

// Issue 11 in Chromium against the production server with the Kestrel demo data: forms report
// every error of one submission (with and without JavaScript), deleting a target asks first,
// no internal warning codes or broken plurals reach readers, unknown addresses get our own 404
// page, and a shared drive log names the damper it was recorded with.

const tag = freshTag();
let browser: Browser;
let vehiclePath = "";
let demoLogs: DemoLog[] = [];

/** "1 engine speeds", "1 drive logs", …: a count of one with a plural noun (the nouns the app counts). */
const BROKEN_PLURAL =
  /(?<![\d.,])1 (?:[a-z-]+ )?(?:engine speeds|speeds|bins|blocks|drive logs|logs|rows|spans|points|members|targets|gears|days|files|addresses)\b/;
/** A snake_case word such as a warning code. */
const SNAKE_CASE = /\b[a-z]+(?:_[a-z]+)+\b/;

beforeAll(async () => {
  browser = await launchBrowser();
  const page = await signIn(browser, "engineer@twistlog.test");
  // A vehicle of this test's own for the target forms, so the demo vehicles stay as seeded.
  const made = await page.request.post(`${baseUrl}/api/v1/vehicles`, {
    data: { name: `Form estate ${tag}`, identifier: `FU-${tag}`, cylinders: 4, stroke: 4 },
    headers: { Origin: baseUrl },
  });
  expect(made.status()).toBe(201);
  vehiclePath = `/vehicles/${((await made.json()) as { vehicle: { id: number } }).vehicle.id}`;
  // The demo logs of both Kestrel vehicles are analysed in the background after seeding.
  const { vehicles } = await apiJson<{ vehicles: { id: number; identifier: string }[] }>(
    page,
    "/api/v1/vehicles",
  );
  const demo = vehicles.filter((v) => v.identifier.startsWith("KST-"));
  expect(demo.length).toBeGreaterThan(0);
  for (let i = 0; i < 300; i++) {
    demoLogs = [];
    for (const v of demo) {
      const { logs } = await apiJson<{ logs: DemoLog[] }>(page, `/api/v1/vehicles/${v.id}/logs`);
      demoLogs.push(...logs.filter((l) => l.fileName.startsWith("kestrel-")));
    }
    if (demoLogs.length && demoLogs.every((l) => l.status === "done" || l.status === "failed"))
      break;
    await new Promise((r) => setTimeout(r, 500));
  }
  expect(demoLogs.filter((l) => l.status === "done").length).toBeGreaterThan(0);
  await page.context().close();
}, 240_000);
afterAll(async () => {
  await browser?.close();
});

/** Opens the add-target form of this test's vehicle and fills it with three mistakes. */
async function fillBadTarget(page: Page) {
  await page.goto(baseUrl + vehiclePath);
  await page.getByText("Add a target").click();
  const form = page.locator("#target-new");
  await form.getByLabel("Name").fill("");
  await form.getByLabel(/From engine speed/).fill("3000");
  await form.getByLabel(/To engine speed/).fill("1000");
  await form.getByLabel(/Minimum isolation/).fill("ten");
  await form.getByRole("button", { name: "Add target" }).click();
  return form;
}

/** All three errors at once, each on its own field. */
async function expectThreeErrors(form: ReturnType<Page["locator"]>) {
  await form.getByText("Give the target a name, e.g. “Run-up isolation 1000–3000 rpm”.").waitFor();
  await form.getByText("The highest engine speed must be above the lowest (3000 rpm).").waitFor();
  await form.getByText("The minimum isolation is a number of dB, e.g. 10 or −2.5.").waitFor();
  for (const label of ["Name", /To engine speed/, /Minimum isolation/])
    await expect(form.getByLabel(label).getAttribute("aria-invalid")).resolves.toBe("true");
  await expect(form.getByLabel(/From engine speed/).getAttribute("aria-invalid")).resolves.not.toBe(
    "true",
  );
}

describe("forms report every error at once", () => {
  it("the target form with JavaScript: empty name, From > To and a non-numeric dB after one submit", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    const form = await fillBadTarget(page);
    await expectThreeErrors(form);
    await snap(page, "target-form-errors");
    await page.context().close();
  });

  it("the same three errors without JavaScript (the server's check), after one submit", async () => {
    const context = await browser.newContext({ javaScriptEnabled: false });
    const page = await context.newPage();
    await page.goto(`${baseUrl}/sign-in`);
    await page.getByLabel("E-mail address").fill("engineer@twistlog.test");
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((url) => url.pathname !== "/sign-in");
    const form = await fillBadTarget(page);
    await page.waitForLoadState("load");
    await expectThreeErrors(form);
    await snap(page, "target-form-errors-no-js");
    await context.close();
  });
});

describe("deleting a target asks first", () => {
  it("the question takes the focus; Escape keeps the target, “Yes, delete” deletes it", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    await page.goto(baseUrl + vehiclePath);
    await page.getByText("Add a target").click();
    const form = page.locator("#target-new");
    const name = `Delete me ${tag}`;
    await form.getByLabel("Name").fill(name);
    await form.getByLabel(/From engine speed/).fill("1000");
    await form.getByLabel(/To engine speed/).fill("3000");
    await form.getByLabel(/Minimum isolation/).fill("5");
    await form.getByRole("button", { name: "Add target" }).click();
    await page.getByText(`The target “${name}” is added`).waitFor();
    const item = page.locator("li[data-target-id]", { hasText: name });
    await item.getByText("Edit or delete").click();
    const ask = item.getByRole("button", { name: `Delete target ${name}` });
    await ask.click();
    const question = item.getByRole("group", { name: `Delete the target “${name}”?` });
    await question.waitFor();
    await expect(ask.getAttribute("aria-expanded")).resolves.toBe("true");
    await expect(
      page.evaluate(() => document.activeElement?.hasAttribute("data-delete-confirm")),
    ).resolves.toBe(true);
    await snap(page, "target-delete-question");
    // Escape keeps it, and the focus goes back to the button that asked.
    await page.keyboard.press("Escape");
    await question.waitFor({ state: "detached" });
    await expect(page.evaluate(() => document.activeElement?.textContent)).resolves.toContain(
      "Delete target",
    );
    await expect(item.count()).resolves.toBe(1);
    // Asked again, the keyboard reaches "Yes, delete" and deletes.
    await page.keyboard.press("Enter");
    await question.waitFor();
    await item.getByRole("button", { name: `Yes, delete ${name}` }).press("Enter");
    await page.getByText(`The target “${name}” is deleted.`).waitFor();
    // The page's data is loaded again after the delete: the target leaves the list.
    await page.locator("li[data-target-id]", { hasText: name }).waitFor({ state: "detached" });
    await page.context().close();
  });
});

/** The visible text of the page (what a reader sees; not the hydration data in scripts). */
const visibleText = (page: Page) => page.locator("body").innerText();

/** The result's warning codes of a demo log, from the API (where the codes belong). */
async function warningCodes(page: Page, logId: number) {
  const r = await page.request.get(`${baseUrl}/api/v1/logs/${logId}/result`);
  expect(r.status()).toBe(200);
  return ((await r.json()) as { warnings: { code: string }[] }).warnings.map((w) => w.code);
}

describe("plain words for readers", () => {
  it("the drive-log pages of the demo logs show warnings as sentences: no codes, no broken plurals", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    let shown = 0;
    for (const log of demoLogs.filter((l) => l.status === "done")) {
      const codes = await warningCodes(page, log.id);
      await page.goto(`${baseUrl}/vehicles/${log.vehicleId}/logs/${log.id}`);
      const text = await visibleText(page);
      for (const code of codes) expect(text, `${log.fileName}: ${code}`).not.toContain(code);
      expect(text, log.fileName).not.toMatch(BROKEN_PLURAL);
      const warnings = page.locator('section[aria-labelledby="warnings-title"] li');
      await expect(warnings.count(), log.fileName).resolves.toBe(codes.length);
      for (const li of await warnings.all()) {
        const sentence = await li.innerText();
        expect(sentence, log.fileName).not.toMatch(SNAKE_CASE);
        expect(sentence, log.fileName).toMatch(/^[A-Z].*\.$/s);
      }
      shown += codes.length;
    }
    // The demo logs do have warnings (else this test could not fail).
    expect(shown).toBeGreaterThan(0);
    await snap(page, "drive-log-warnings");
    await page.context().close();
  });

  it("a shared variant-B run-up names its own damper, and shows no codes or broken plurals", async () => {
    const log = demoLogs.find((l) => l.status === "done" && l.damperVariant === "B");
    expect(log, "a finished demo log recorded with damper variant B").toBeDefined();
    const page = await signIn(browser, "engineer@twistlog.test");
    const vehicle = (await (
      await page.request.get(`${baseUrl}/api/v1/vehicles/${log!.vehicleId}`)
    ).json()) as { vehicle: { damperVariant: string } };
    // The seeded vehicle is fitted with variant A (app/demo/demo-drive-logs.server.ts).
    expect(vehicle.vehicle.damperVariant).not.toBe("B");
    const codes = await warningCodes(page, log!.id);
    const made = await page.request.post(`${baseUrl}/api/v1/logs/${log!.id}/shares`, {
      data: { expiresInDays: 1, note: `Variant B ${tag}` },
      headers: { Origin: baseUrl },
    });
    expect(made.status()).toBe(201);
    const { share } = (await made.json()) as { share: { url: string } };
    await page.context().close();

    const guest = await (await browser.newContext()).newPage();
    expect((await guest.goto(share.url))?.status()).toBe(200);
    const damper = guest.locator("[data-log-damper]");
    await expect(damper.innerText()).resolves.toMatch(/variant B$/);
    const vehicleCard = guest.locator('section[aria-labelledby="vehicle-title"]');
    await expect(vehicleCard.innerText()).resolves.toContain(`Vehicle's fitted damper\n`);
    // Where variant A appears at all, it is labelled as the vehicle's.
    const text = await visibleText(guest);
    for (const line of text.split("\n").filter((l) => /variant A\b/.test(l)))
      expect(
        text.split("\n")[text.split("\n").indexOf(line) - 1],
        "the line before names it the vehicle's",
      ).toBe("Vehicle's fitted damper");
    for (const code of codes) expect(text, code).not.toContain(code);
    expect(text).not.toMatch(BROKEN_PLURAL);
    expect(codes.length).toBeGreaterThan(0);
    await snap(guest, "shared-variant-b");
    await guest.context().close();
  });
});

describe("an unknown address", () => {
  it("is a 404 page in our words with a way back, signed out and signed in", async () => {
    const guest = await (await browser.newContext()).newPage();
    const response = await guest.goto(`${baseUrl}/audit`);
    expect(response?.status()).toBe(404);
    await guest
      .getByRole("heading", { level: 1, name: "There is no page at this address" })
      .waitFor();
    const text = await visibleText(guest);
    expect(text).not.toMatch(/No route matches|Error: /);
    const ways = guest.getByRole("navigation", { name: "Ways back" });
    await expect(
      ways.getByRole("link", { name: "Go to Vehicles" }).getAttribute("href"),
    ).resolves.toBe("/vehicles");
    await ways.getByRole("link", { name: "Start page" }).waitFor();
    await ways.getByRole("link", { name: "Sign in" }).waitFor();
    await snap(guest, "not-found");
    await guest.context().close();

    const page = await signIn(browser, "viewer@twistlog.test");
    expect((await page.goto(`${baseUrl}/vehicles/1/nowhere`))?.status()).toBe(404);
    const signedIn = page.getByRole("navigation", { name: "Ways back" });
    await signedIn.getByRole("link", { name: "Go to Vehicles" }).click();
    await page.waitForURL(`${baseUrl}/vehicles`);
    await page.context().close();
  });
});
