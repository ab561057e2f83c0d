import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { baseUrl, freshTag, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// "Re-analyse all" (issue 17) in Chromium against the production server of scripts/test.sh:
// the demo engineer makes a vehicle (the panel's empty state), uploads two analytic idle logs
// (tests/support/analytic-log.ts), has a setting refused with the field's message, then
// re-analyses both and watches the panel's live progress reach "finished"; the demo technician
// does not see the panel.

let browser: Browser;
let engineer: Page;
// Made again by the test that adds the vehicle: each attempt adds its own (vitest.e2e.config.ts).
let tag = freshTag();
let vehiclePath = "";

beforeAll(async () => {
  browser = await launchBrowser();
  engineer = await signIn(browser, "engineer@twistlog.test");
  await engineer.setViewportSize({ width: 1440, height: 900 });
});
afterAll(async () => {
  await browser?.close();
});

const panelOf = (page: Page) => page.getByRole("region", { name: "Re-analyse all drive logs" });

describe("re-analyse all in the browser", () => {
  it("an engineer re-analyses a vehicle's drive logs and sees the progress reach the end", async () => {
    tag = freshTag();
    const page = engineer;
    await page.goto(`${baseUrl}/vehicles/new`);
    await page.getByLabel("Name").fill(`Batch estate ${tag}`);
    await page.getByLabel("Identifier").fill(`BAT-${tag}`);
    await page.getByLabel("Cylinders").fill("4");
    await page.getByRole("button", { name: "Add vehicle" }).click();
    await page.waitForURL(/\/vehicles\/\d+$/);
    vehiclePath = new URL(page.url()).pathname;
    await panelOf(page).getByText("No drive logs yet").waitFor();

    const names = [`batch-a-${tag}.csv`, `batch-b-${tag}.csv`];
    await page.locator("#upload-files").setInputFiles(
      names.map((name, i) => ({
        name,
        mimeType: "text/csv",
        buffer: Buffer.from(analyticIdleCsv({ ...IDLE_800, durationS: 4 }) + "\n".repeat(i)),
      })),
    );
    for (const name of names)
      await page
        .locator("fieldset", { hasText: name })
        .getByLabel("Test condition")
        .selectOption("idle-neutral");
    await page.getByRole("button", { name: "Upload 2 files" }).click();
    // Each upload row keeps its own status; the page's one live region says only the latest
    // news, so the first file's "finished" is gone once the second's arrives.
    for (const name of names)
      await page
        .locator("fieldset", { hasText: name })
        .locator('[data-log-status="done"]')
        .waitFor({ timeout: 180_000 });
    await page.goto(baseUrl + vehiclePath);

    const panel = panelOf(page);
    const blocks = panel.getByLabel("Revolutions per block");
    await blocks.fill("0");
    await panel.getByRole("button", { name: "Re-analyse all" }).click();
    await panel.getByText("At least 1 revolution per block.").waitFor();
    await expect(blocks.getAttribute("aria-invalid")).resolves.toBe("true");

    await blocks.fill("16");
    await panel.getByRole("button", { name: "Re-analyse all" }).click();
    // The live region says how far the batch is, and at the end that both are done.
    const status = panel.getByRole("status");
    await status.getByText("Re-analysis finished: 2 of 2 done.").waitFor({ timeout: 120_000 });
    await expect(status.getAttribute("aria-live")).resolves.toBe("polite");
    await panel.getByText("Each drive log").click();
    for (const name of names)
      await panel
        .getByRole("listitem")
        .filter({ hasText: name })
        .getByText("done (version 2)")
        .waitFor();
    await snap(page, "reanalyse-all-finished");
    // The same room for the analyses as the other upload tests give (no speed is asserted).
  }, 300_000);

  it("a technician does not see the panel", async () => {
    expect(vehiclePath).not.toBe("");
    const technician = await signIn(browser, "technician@twistlog.test");
    await technician.goto(baseUrl + vehiclePath);
    await technician.getByRole("heading", { name: "Drive logs", exact: true }).waitFor();
    expect(await panelOf(technician).count()).toBe(0);
  });
});
