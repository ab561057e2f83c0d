import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, IDLE_800 } from "../support/analytic-log";
import { baseUrl, freshTag, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// Issue 11 §3.5 in Chromium against the production server: the upload list says why a file's
// analysis failed and links to the column choice; files the server would refuse (empty, binary)
// are marked as not sendable and left out of the upload button's count.

let browser: Browser;
// Made again by the test that adds the vehicle: each attempt adds its own (vitest.e2e.config.ts).
let tag = freshTag();

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

const short = { ...IDLE_800, durationS: 2 };
// "shaft b" names no gearbox-side word, so the gearbox channel cannot be told from the header.
const unreadableHeader = analyticIdleCsv(short).replace(
  "time [s],crank speed [rpm],gearbox input speed [rpm]",
  "time [s],engine speed [rpm],shaft b [rpm]",
);
// Row 4 of the file (the header is row 1) has text in the crank column.
const badRow =
  "time [s],crank speed [rpm],gearbox input speed [rpm]\n0.000,800,800\n0.001,800,800\n0.002,eight hundred,800\n";
// A few bytes of a compressed archive: NUL bytes, which CSV never has.
const binary = Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x00, 0x00, 0x08, 0x00, 0x0a]);

describe("the upload list", () => {
  it("says why a file failed with a link to fix its columns, and never counts files that cannot be sent", async () => {
    tag = freshTag();
    const page = await signIn(browser, "engineer@twistlog.test");
    await page.goto(`${baseUrl}/vehicles/new`);
    await page.getByLabel("Name").fill(`Kestrel upload car ${tag}`);
    await page.getByLabel("Identifier").fill(`UPL-${tag}`);
    await page.getByLabel("Cylinders").fill("4");
    await page.getByRole("button", { name: "Add vehicle" }).click();
    await page.waitForURL(/\/vehicles\/\d+$/);
    const vehiclePath = new URL(page.url()).pathname;

    const header = `header-${tag}.csv`;
    const bad = `badrow-${tag}.csv`;
    const empty = `empty-${tag}.csv`;
    const blob = `logger-${tag}.csv`;
    await page.locator("#upload-files").setInputFiles([
      { name: header, mimeType: "text/csv", buffer: Buffer.from(unreadableHeader) },
      { name: bad, mimeType: "text/csv", buffer: Buffer.from(badRow) },
      { name: empty, mimeType: "text/csv", buffer: Buffer.alloc(0) },
      { name: blob, mimeType: "text/csv", buffer: binary },
    ]);
    const row = (name: string) => page.locator("fieldset", { hasText: name });

    // The empty and the binary file are marked, with the reason, and left out of the count.
    await row(empty).getByText("Cannot be sent").waitFor();
    await row(empty).getByText(`${empty} is empty: choose the drive log file itself.`).waitFor();
    await row(blob).getByText("Cannot be sent").waitFor();
    await row(blob)
      .getByText(/is not a text file \(it holds binary data\)/)
      .waitFor();
    await expect(row(header).getByText("Cannot be sent").count()).resolves.toBe(0);
    await expect(page.locator('fieldset[data-sendable="false"]').count()).resolves.toBe(2);
    const button = page.getByRole("button", { name: "Upload 2 of 4 files" });
    await button.waitFor();
    await expect(page.getByRole("button", { name: /^Upload 4 files$/ }).count()).resolves.toBe(0);
    await page.getByText("2 files cannot be sent and are left out").waitFor();
    await snap(page, "upload-list-unsendable");

    await button.click();
    // The reason in a plain sentence in the file's own row: where (row, column) and what.
    const headerReason = row(header).getByText(`${header} could not be analysed.`);
    await headerReason.waitFor({ timeout: 45_000 });
    await expect(headerReason.textContent()).resolves.toMatch(
      /^header-\w+\.csv could not be analysed\. Row 1: no gearbox-side speed column recognised in the header \("time \[s\]", "engine speed \[rpm\]", "shaft b \[rpm\]"\); choose one\. Choose the columns/,
    );
    const badReason = row(bad).getByText(`${bad} could not be analysed.`);
    await badReason.waitFor({ timeout: 45_000 });
    await expect(badReason.textContent()).resolves.toMatch(
      /could not be analysed\. Row 4, column 'crank speed \[rpm\]': .*eight hundred/,
    );
    // The refused files were never sent: still marked, and no drive log of theirs exists.
    await expect(page.locator('fieldset[data-sendable="false"]').count()).resolves.toBe(2);
    await expect(page.getByRole("link", { name: empty }).count()).resolves.toBe(0);
    await expect(page.getByRole("link", { name: blob }).count()).resolves.toBe(0);
    await snap(page, "upload-list-failed");

    // The fix link opens the drive log's column choice.
    const fix = row(header).getByRole("link", { name: `Choose the columns of ${header}` });
    await expect(fix.getAttribute("href")).resolves.toMatch(
      new RegExp(`^${vehiclePath}/logs/\\d+#mapping-title$`),
    );
    await fix.click();
    await page.waitForURL(/\/logs\/\d+#mapping-title$/);
    await page.getByRole("heading", { name: "Channel chooser" }).waitFor();
    await page
      .getByText("The last analysis recognised the channels by their names in the file.")
      .waitFor();
    await snap(page, "upload-fix-columns");

    await page.goto(baseUrl + vehiclePath);
    await page
      .locator("#upload-files")
      .setInputFiles([{ name: empty, mimeType: "text/csv", buffer: Buffer.alloc(0) }]);
    // Nothing in the list can be sent: no upload button at all.
    await row(empty).getByText("Cannot be sent").waitFor();
    await expect(page.getByRole("button", { name: /^Upload/ }).count()).resolves.toBe(0);
    await page.getByText("1 file cannot be sent and is left out").waitFor();
    await page.context().close();
  });
});
