import { readFile } from "node:fs/promises";
import { join } from "node:path";
import type { Browser, Locator, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { repoRoot } from "../support/processes";
import { baseUrl, freshTag, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// Issue 14 in Chromium against the production server: an ASAM MDF4 drive log is uploaded, the
// channel chooser lists its channels, the two speeds are picked, and the analysis finishes.
// The team's Logger vocabulary is edited on the team page.

let browser: Browser;
const tag = freshTag();

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

/** The analytic idle log under a logger's own names, with a fourth channel (oil, constant 85). */
function loggerCsv(): string {
  return analyticIdleCsv({ ...IDLE_800, durationS: 3 })
    .split("\n")
    .map((l, i) =>
      l === "" ? l : i === 0 ? "Zeit;Kanal1;Kanal2;Oel" : `${l.replaceAll(",", ";")};85`,
    )
    .join("\n");
}

/** One part of the page, for looking at it closely (SCREENSHOT_DIR only, not a check). */
async function snapPart(locator: Locator, name: string) {
  const dir = process.env.SCREENSHOT_DIR;
  if (dir) await locator.screenshot({ path: `${dir}/${name}.png` });
}

async function newVehicle(page: Page, label: string) {
  const unique = freshTag();
  await page.goto(`${baseUrl}/vehicles/new`);
  await page.getByLabel("Name").fill(`Kestrel ${label} car ${unique}`);
  await page.getByLabel("Identifier").fill(`${label}-${unique}`);
  await page.getByLabel("Cylinders").fill("4");
  await page.getByRole("button", { name: "Add vehicle" }).click();
  await page.waitForURL(/\/vehicles\/\d+$/);
}

describe("the channel chooser", () => {
  it("a CSV with a logger's own names: pick the channels by keyboard and mouse, and it is analysed", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    await newVehicle(page, "CSV");
    const name = `logger-${tag}.csv`;
    await page
      .locator("#upload-files")
      .setInputFiles([{ name, mimeType: "text/csv", buffer: Buffer.from(loggerCsv()) }]);
    await page.getByRole("button", { name: "Upload 1 file" }).click();
    const row = page.locator("fieldset", { hasText: name });
    await row
      .getByRole("link", { name: `Choose the columns of ${name}` })
      .click({ timeout: 60_000 });
    await page.getByRole("heading", { name: "Channel chooser" }).waitFor();
    const time = page.getByRole("radio", { name: "Time: Zeit" });
    await time.waitFor({ timeout: 30_000 });
    await expect(page.locator("tr[data-channel]").count()).resolves.toBe(4);
    await page.getByLabel("Filter channels").fill("kanal");
    await page.getByText("2 of 4 channels shown").waitFor();
    await page.getByRole("radio", { name: "Crank: Kanal1" }).check();
    await page.getByRole("radio", { name: "Gearbox: Kanal2" }).check();
    await page.getByLabel("Filter channels").fill("");
    // A role's radios are one group: the arrow keys move the pick between channels.
    const recognise = page.getByRole("radio", { name: "Time: recognise from the file" });
    await expect(recognise.isChecked()).resolves.toBe(true);
    await recognise.focus();
    await page.keyboard.press("ArrowDown");
    await expect(time.isChecked()).resolves.toBe(true);
    await page.getByLabel("Crank speed unit").selectOption("rpm");
    await page.getByLabel("Gearbox speed unit").selectOption("rpm");
    await page.locator("[data-picked='crank']").getByText("Kanal1").waitFor();
    await snap(page, "chooser-csv-picked");
    await snapPart(page.locator("section[aria-labelledby='mapping-title']"), "chooser-csv-card");
    await page.getByRole("button", { name: "Analyse with these channels" }).click();
    await page.getByText(/The channels are set and remembered for this vehicle/).waitFor();
    await page.getByRole("heading", { name: /^Analysis version/ }).waitFor({ timeout: 90_000 });
    await page.locator("[data-source-format='csv']").waitFor();
    await snap(page, "chooser-csv-done");
    await page.context().close();
  });

  it("an MDF4 upload: pick EngSpd and GbxInpShaftSpd, and the analysis is done", async () => {
    // Written by an independent MDF4 implementation (see tests/fixtures/mdf4/ for its origin).
    const mf4 = await readFile(join(repoRoot, "tests/fixtures/mdf4/drive-log-plain.mf4"));
    const page = await signIn(browser, "engineer@twistlog.test");
    await newVehicle(page, "MF4");

    const name = `kestrel-${tag}.mf4`;
    await page
      .locator("#upload-files")
      .setInputFiles([{ name, mimeType: "application/octet-stream", buffer: mf4 }]);
    const row = page.locator("fieldset", { hasText: name });
    await expect(row.getByText("Cannot be sent").count()).resolves.toBe(0);
    await page.getByRole("button", { name: "Upload 1 file" }).click();
    await row.getByText(/Uploaded as/).waitFor();
    await page
      .getByText(new RegExp(`Analysis of ${name.replace(".", "\\.")} (finished|failed)\\.`))
      .waitFor({ state: "attached", timeout: 60_000 });
    await row.getByRole("link", { name: /^drive log \d+$/ }).click();
    await page.waitForURL(/\/logs\/\d+(#.*)?$/);

    await page.getByRole("heading", { name: "Channel chooser" }).waitFor();
    // Folded when the first analysis read the file fine: open it.
    const fold = page.locator("section[aria-labelledby='mapping-title'] summary");
    if (await fold.count()) await fold.click();
    const crank = page.getByRole("radio", { name: "Crank: EngSpd" });
    await crank.waitFor({ timeout: 30_000 });
    // The filter narrows the table; a pick survives it.
    await page.getByLabel("Filter channels").fill("GbxInp");
    await expect(page.locator("tr[data-channel='EngSpd']").count()).resolves.toBe(0);
    await page.getByRole("radio", { name: "Gearbox: GbxInpShaftSpd" }).check();
    await page.getByLabel("Filter channels").fill("");
    await crank.check();
    await expect(crank.isChecked()).resolves.toBe(true);
    await page.locator("[data-picked='crank']").getByText("EngSpd").waitFor();
    await page.locator("[data-picked='gearbox']").getByText("GbxInpShaftSpd").waitFor();
    // The small chart of the picks, drawn from them: a canvas and a text alternative with both
    // ranges. The fixture's independent reader (tests/fixtures/mdf4/drive-log-plain.expected.json)
    // found EngSpd 782.5–1417.75 rpm and GbxInpShaftSpd 799.65–1400.01 rpm over 0–4 s.
    const chart = page.locator("[data-chart='speed-preview'][data-status='ready']");
    await chart.locator("canvas").waitFor({ timeout: 30_000 });
    const alt = await chart.locator("p.sr-only").textContent();
    expect(alt).toMatch(
      /Crank side 78[23]–1,?418 rpm, gearbox input 800–1,?400 rpm over 0\.0–4\.0 s/,
    );
    await expect(chart.getByRole("img").getAttribute("aria-describedby")).resolves.toBeTruthy();
    await snap(page, "chooser-mdf4-picked");
    await snapPart(page.locator("section[aria-labelledby='mapping-title']"), "chooser-mdf4-card");
    // A pick that is not a speed: the reader's message under the chart, the form still sendable.
    await page.getByRole("radio", { name: "Crank: AccPedlPosn" }).check();
    await page
      .locator("[data-speed-preview='error']")
      .getByText(/AccPedlPosn.*not a speed unit/)
      .waitFor();
    await snapPart(page.locator("[data-speed-preview]"), "chooser-mdf4-preview-error");
    await crank.check();
    await chart.waitFor();
    await expect(
      page.getByRole("button", { name: "Analyse with these channels" }).isEnabled(),
    ).resolves.toBe(true);

    await page.getByRole("button", { name: "Analyse with these channels" }).click();
    await page.getByText(/The channels are set and remembered for this vehicle/).waitFor();
    await page.getByRole("heading", { name: /^Analysis version/ }).waitFor({ timeout: 90_000 });
    await page.getByText("Where the numbers came from").waitFor();
    await page.locator("[data-source-format='mdf4']").waitFor();
    await page.getByText("the crank side from “EngSpd”", { exact: false }).waitFor();
    await snap(page, "chooser-mdf4-done");
    await snapPart(page.locator("section[aria-labelledby='file-details-title']"), "file-details");
    await snapPart(page.locator("[data-source-format='mdf4']"), "source-panel-mdf4");
    await page.context().close();
  });

  it("the team's Logger vocabulary: an engineer adds and removes a channel name", async () => {
    const page = await signIn(browser, "engineer@twistlog.test");
    await page.goto(`${baseUrl}/team`);
    const card = page.locator("#logger-vocabulary-title").locator("..");
    await page.getByRole("heading", { name: "Logger vocabulary" }).waitFor();
    const channel = `n_kw_${tag}`;
    await page.getByLabel("Channel name").fill(channel);
    await page.getByLabel("Read as").selectOption("crank");
    await page.getByLabel("Unit", { exact: true }).selectOption("rpm");
    await page.getByRole("button", { name: "Add channel name" }).click();
    await page.getByRole("cell", { name: channel, exact: true }).waitFor();
    await snap(page, "team-logger-vocabulary");
    await page.getByRole("button", { name: `Remove ${channel}` }).click();
    await page.getByText(`“${channel}” is no longer one of the team's channel names.`).waitFor();
    await page.getByRole("cell", { name: channel, exact: true }).waitFor({ state: "detached" });
    expect(await card.count()).toBeGreaterThan(0);
    await page.context().close();
  });
});
