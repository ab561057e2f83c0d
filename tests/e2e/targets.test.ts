import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, expectedIsolationDb, IDLE_800 } from "../support/analytic-log";
import { baseUrl, freshTag, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// Targets in Chromium against the production server of scripts/test.sh (demo accounts). The test
// makes its own vehicle so the demo vehicles' targets stay as seeded.

let browser: Browser;
let vehiclePath = "";
// Made again by the test that adds the vehicle: each attempt adds its own (vitest.e2e.config.ts).
let tag = freshTag();
// Isolation of the analytic idle log: −20·log10|H(r)| of the base-excited two-mass system (Harris'
// Shock and Vibration Handbook ch. 30; Ogata, System Dynamics, eq. 9-14), 11.2 dB; the pipeline
// meets it within 0.3 dB (the API test's tolerance). The target asks 1 dB less.
const minDb = (expectedIsolationDb(IDLE_800) - 1).toFixed(2);

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("targets in the browser", () => {
  it("an engineer sets a target with the form; a reversed range is refused on its field", async () => {
    tag = freshTag();
    const page = await signIn(browser, "engineer@twistlog.test");
    await page.goto(`${baseUrl}/vehicles/new`);
    await page.getByLabel("Name").fill(`Target estate ${tag}`);
    await page.getByLabel("Identifier").fill(`TGT-${tag}`);
    await page.getByLabel("Cylinders").fill("4");
    await page.getByRole("button", { name: "Add vehicle" }).click();
    await page.waitForURL(/\/vehicles\/\d+$/);
    vehiclePath = new URL(page.url()).pathname;

    await page.getByText("Add a target").click();
    const form = page.locator("#target-new");
    await form.getByLabel("Name").fill("Idle isolation");
    await form.getByLabel(/From engine speed/).fill("825");
    await form.getByLabel(/To engine speed/).fill("775");
    await form.getByLabel(/Minimum isolation/).fill(minDb);
    await form.getByRole("button", { name: "Add target" }).click();
    const to = form.getByLabel(/To engine speed/);
    await expect(to.getAttribute("aria-invalid")).resolves.toBe("true");
    await form.getByText("The highest engine speed must be above the lowest (825 rpm).").waitFor();
    await form.getByLabel(/From engine speed/).fill("775");
    await to.fill("825");
    await form.getByRole("button", { name: "Add target" }).click();
    await page.getByText("The target “Idle isolation” is added").waitFor();
    await page.getByText("No analysed drive logs yet").first().waitFor();
    await snap(page, "targets-set");
    await page.context().close();
  });

  it("a drive log analysed after the target exists shows pass with its margin", async () => {
    expect(vehiclePath).not.toBe("");
    const page = await signIn(browser, "technician@twistlog.test");
    await page.goto(baseUrl + vehiclePath);
    const name = `idle-${tag}.csv`;
    await page.locator("#upload-files").setInputFiles({
      name,
      mimeType: "text/csv",
      buffer: Buffer.from(analyticIdleCsv(IDLE_800)),
    });
    const row = page.locator("fieldset", { hasText: name });
    await row.getByLabel("Test condition").selectOption("idle-neutral");
    await page.getByRole("button", { name: "Upload 1 file" }).click();
    await page
      .getByText(`Analysis of ${name} finished.`)
      .waitFor({ state: "attached", timeout: 45_000 });
    // The page loads again when the analysis ends: the target's latest verdict and the table.
    const latest = page.locator("[data-latest-verdict]");
    await latest.waitFor();
    await expect(latest.getAttribute("data-latest-verdict")).resolves.toBe("pass");
    const text = (await latest.textContent()) ?? "";
    const margin = Number(
      /margin ([+−])([\d.]+) dB/.exec(text)?.slice(1).join("").replace("−", "-"),
    );
    // Margin = isolation − minDb = 1 dB (docs/targets.md), 0.3 dB + 0.05 dB for one decimal.
    expect(Math.abs(margin - 1)).toBeLessThan(0.35);
    await page.locator("tbody tr", { hasText: name }).getByText("passed 1").waitFor();
    await snap(page, "targets-verdict");
    await page.context().close();
  });

  it("a viewer sees the target and its verdict but no form to set or change targets", async () => {
    const page = await signIn(browser, "viewer@twistlog.test");
    await page.goto(baseUrl + vehiclePath);
    await page.getByText("Idle isolation", { exact: true }).waitFor();
    await page.locator("[data-latest-verdict='pass']").waitFor();
    await expect(page.getByText("Add a target").count()).resolves.toBe(0);
    await expect(page.getByText("Edit or delete").count()).resolves.toBe(0);
    await page.context().close();
  });
});
