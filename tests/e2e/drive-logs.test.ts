import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, expectedIsolationDb, type AnalyticIdle } from "../support/analytic-log";
import { baseUrl, freshTag, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// Vehicles and drive logs in Chromium against the production server of scripts/test.sh (demo
// accounts of the Kestrel team). The test makes its own vehicle, so it does not depend on
// what the demo data holds.

let browser: Browser;
let vehiclePath = "";
// Made again by the test that adds the vehicle: each attempt adds its own (vitest.e2e.config.ts).
let tag = freshTag();

// An analytic idle log (tests/support/analytic-log.ts): order-2 fluctuation at 800 rpm through a
// base-excited two-mass system with fn = 12 Hz, ζ = 0.1, so the isolation is known beforehand.
const idle: AnalyticIdle = {
  rpm: 800,
  order: 2,
  crankAmpRpm: 10,
  naturalHz: 12,
  zeta: 0.1,
  durationS: 60,
  sampleRateHz: 5000,
};

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

/** Records every state a drive-log status or progress bar is drawn in, however briefly. */
async function watchStates(page: Page) {
  await page.addInitScript(() => {
    const seen: string[] = [];
    (window as unknown as { __states: string[] }).__states = seen;
    const record = () => {
      for (const el of document.querySelectorAll("[data-log-status]"))
        seen.push(`status:${el.getAttribute("data-log-status")}`);
      for (const el of document.querySelectorAll("progress"))
        seen.push(`${el.getAttribute("aria-label")}:${(el as HTMLProgressElement).value}`);
    };
    new MutationObserver(record).observe(document, {
      subtree: true,
      childList: true,
      attributes: true,
      characterData: true,
    });
  });
}

async function uploadOne(page: Page, name: string, csv: string, condition: string) {
  await page.locator("#upload-files").setInputFiles({
    name,
    mimeType: "text/csv",
    buffer: Buffer.from(csv),
  });
  const row = page.locator("fieldset", { hasText: name });
  await row.getByLabel("Test condition").selectOption(condition);
  await page.getByRole("button", { name: "Upload 1 file" }).click();
  await row.getByText(/Uploaded as/).waitFor();
  return row;
}

describe("vehicles and drive logs in the browser", () => {
  it("an engineer adds a vehicle through the form; a taken identifier is a field error", async () => {
    tag = freshTag();
    const page = await signIn(browser, "engineer@twistlog.test");
    await page.goto(`${baseUrl}/vehicles`);
    await page.getByRole("link", { name: "Add vehicle" }).click();
    await page.waitForURL(`${baseUrl}/vehicles/new`);
    // The rattle limit starts at the published default with its source beside it.
    await expect(page.getByLabel(/Rattle limit/).inputValue()).resolves.toBe("500");
    await page.getByText(/Shock and Vibration 2022, art\. 2954825/).waitFor();

    await page.getByRole("button", { name: "Add vehicle" }).click();
    const name = page.getByLabel("Name");
    await expect(name.getAttribute("aria-invalid")).resolves.toBe("true");
    const describedBy = (await name.getAttribute("aria-describedby")) ?? "";
    await expect(
      page.locator(`[id="${describedBy.split(" ").pop()}"]`).textContent(),
    ).resolves.toBe("Give the vehicle a name.");
    await expect(page.evaluate(() => document.activeElement?.getAttribute("name"))).resolves.toBe(
      "name",
    );
    await name.fill(`E2E estate ${tag}`);
    await page.getByLabel("Identifier").fill(`E2E-${tag}`);
    await page.getByLabel("Cylinders").fill("4");
    await snap(page, "vehicle-new");
    await page.getByRole("button", { name: "Add vehicle" }).click();
    await page.waitForURL(/\/vehicles\/\d+$/);
    vehiclePath = new URL(page.url()).pathname;
    await page.getByRole("heading", { level: 1, name: `E2E estate ${tag}` }).waitFor();
    // Four-stroke, four cylinders: firing order z/2 = 2 (common practice).
    await page.getByText("(z/2, four-stroke)").waitFor();

    // The same identifier again is refused on the identifier field.
    await page.goto(`${baseUrl}/vehicles/new`);
    await page.getByLabel("Name").fill("Second car");
    await page.getByLabel("Identifier").fill(`E2E-${tag}`);
    await page.getByRole("button", { name: "Add vehicle" }).click();
    const identifier = page.getByLabel("Identifier");
    await page.getByText(`Another vehicle of the team is E2E-${tag} already.`).waitFor();
    await expect(identifier.getAttribute("aria-invalid")).resolves.toBe("true");
    await page.context().close();
  });

  it("a technician uploads a drive log, sees its progress, then the analysis summary", async () => {
    expect(vehiclePath).not.toBe("");
    const page = await signIn(browser, "technician@twistlog.test");
    await watchStates(page);
    await page.goto(baseUrl + vehiclePath);
    await page.getByRole("complementary", { name: "Safety on road tests" }).waitFor();
    await expect(page.getByRole("button", { name: "Edit vehicle" }).count()).resolves.toBe(0);
    const name = `idle-${tag}.csv`;
    await uploadOne(page, name, analyticIdleCsv(idle), "idle-neutral");
    await snap(page, "vehicle-uploading");
    await page
      .getByText(`Analysis of ${name} finished.`)
      .waitFor({ state: "attached", timeout: 45_000 });
    const states = await page.evaluate(
      () => (window as unknown as { __states: string[] }).__states,
    );
    // The upload's own progress bar was drawn, and the log was shown queued or analysing before done.
    expect(states.some((s) => s.startsWith(`Upload of ${name}:`))).toBe(true);
    expect(states.some((s) => s === "status:queued" || s === "status:analysing")).toBe(true);
    await snap(page, "vehicle-after-upload");

    await page.getByRole("link", { name }).first().click();
    await page.waitForURL(/\/logs\/\d+$/);
    await page.getByRole("heading", { name: /^Analysis version 1/ }).waitFor();
    // Isolation at idle against −20·log10|H(r)| of the base-excited two-mass system (Harris'
    // Shock and Vibration Handbook ch. 30; Ogata, System Dynamics, eq. 9-14): 0.3 dB as in the
    // API test, plus 0.05 dB for the page's one-decimal rounding.
    const idleText = await page
      .locator("dt", { hasText: "At idle" })
      .locator("xpath=following-sibling::dd[1]")
      .textContent();
    const shown = Number((idleText ?? "").replace("−", "-").replace(" dB", ""));
    expect(Math.abs(shown - expectedIsolationDb(idle))).toBeLessThan(0.35);
    await page.getByText("Below the limit").waitFor();
    await page.getByText("500 rad/s²").first().waitFor();
    await page.getByRole("complementary", { name: "About these verdicts" }).waitFor();
    await snap(page, "drive-log-done");
    await page.context().close();
  });

  it("a broken file ends as failed, and its page names the row and the column", async () => {
    const page = await signIn(browser, "technician@twistlog.test");
    await page.goto(baseUrl + vehiclePath);
    const name = `broken-${tag}.csv`;
    // Row 4 of the file (the header is row 1) has text in the crank column.
    const csv =
      "time [s],crank speed [rpm],gearbox input speed [rpm]\n0.000,800,800\n0.001,800,800\n0.002,eight hundred,800\n";
    await uploadOne(page, name, csv, "other");
    await page
      .getByText(`Analysis of ${name} failed.`)
      .waitFor({ state: "attached", timeout: 45_000 });
    await page.getByRole("link", { name }).first().click();
    await page.waitForURL(/\/logs\/\d+$/);
    await page.getByRole("heading", { name: "This drive log could not be analysed" }).waitFor();
    await page.getByText(/^Row 4, column 'crank speed \[rpm\]': /).waitFor();
    await snap(page, "drive-log-failed");
    await page.context().close();
  });
});
