import { readFile } from "node:fs/promises";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { analyticIdleCsv, expectedIsolationDb, IDLE_800, transferH } from "../support/analytic-log";
import { baseUrl, freshTag, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// Sign-off (issue 16) in Chromium against the production server of scripts/test.sh: the demo
// engineer proposes a sign-off of their own vehicle's damper variant, the demo admin approves it,
// the evidence report is downloaded and read by an independent PDF reader (pdfjs-dist), and a
// re-analysis of the claimed drive log marks the sign-off superseded with the reason while the
// stored report stays byte for byte the same. The test makes its own vehicle, targets and log.

let browser: Browser;
let engineer: Page;
let admin: Page;
// Set again by each attempt of the first test (vitest.e2e.config.ts retries a failed test once):
// a retry makes its own vehicle rather than meet the identifier its failed attempt took.
let tag = freshTag();
let logName = `idle-signoff-${tag}.csv`;
let vehiclePath = "";
let signoffPath = "";
let approvedPdf: Buffer | null = null;
let approvedDigest = "";

// The analytic idle log (tests/support/analytic-log.ts): isolation at the firing order is
// −20·log10|H(r)| of the base-excited two-mass system (Harris' Shock and Vibration Handbook
// ch. 30; Ogata, System Dynamics, eq. 9-14), 11.2 dB; the isolation target asks 1 dB less, so it
// passes (the pipeline meets the figure within 0.3 dB: tests/e2e/targets.test.ts).
const minDb = (expectedIsolationDb(IDLE_800) - 1).toFixed(2);
// Its gearbox-input angular acceleration: the speed fluctuation crankAmp·|H| rpm at the firing
// frequency f = 800/60·2 Hz has the amplitude 2πf · crankAmp·|H|·2π/60 rad/s² (differentiating a
// sine), about 48 rad/s²; a rattle limit of a fifth of that fails however the figure is taken
// (0-peak or RMS), so the claim needs a deviation.
const f = (IDLE_800.rpm / 60) * IDLE_800.order;
const h = transferH(f / IDLE_800.naturalHz, IDLE_800.zeta).magnitude;
const alpha = 2 * Math.PI * f * ((IDLE_800.crankAmpRpm * h * 2 * Math.PI) / 60);
const rattleLimit = Math.round(alpha / 5);

/** The number of pages and the text of each, read by pdfjs-dist (Mozilla's PDF reader). */
async function readPdf(bytes: Buffer): Promise<{ pages: number; text: string[] }> {
  const { getDocument } = await import("pdfjs-dist/legacy/build/pdf.mjs");
  const doc = await getDocument({ data: new Uint8Array(bytes), verbosity: 0 }).promise;
  const text: string[] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent();
    text.push(content.items.map((it) => ("str" in it ? it.str : "")).join(" "));
  }
  await doc.destroy();
  return { pages: doc.numPages, text };
}

/** Clicks a download link and returns the file's bytes. */
async function download(page: Page, name: string | RegExp): Promise<Buffer> {
  const [file] = await Promise.all([
    page.waitForEvent("download"),
    page.getByRole("link", { name }).first().click(),
  ]);
  const path = await file.path();
  return readFile(path);
}

beforeAll(async () => {
  browser = await launchBrowser();
  engineer = await signIn(browser, "engineer@twistlog.test");
  admin = await signIn(browser, "admin@twistlog.test");
  await engineer.setViewportSize({ width: 1440, height: 900 });
  await admin.setViewportSize({ width: 1440, height: 900 });
});
afterAll(async () => {
  await browser?.close();
});

describe("sign-off in the browser", () => {
  it("the engineer makes a vehicle with two targets and one analysed drive log", async () => {
    tag = freshTag();
    logName = `idle-signoff-${tag}.csv`;
    const page = engineer;
    await page.goto(`${baseUrl}/vehicles/new`);
    await page.getByLabel("Name").fill(`Sign-off estate ${tag}`);
    await page.getByLabel("Identifier").fill(`SGN-${tag}`);
    await page.getByLabel("Cylinders").fill("4");
    await page.getByRole("button", { name: "Add vehicle" }).click();
    await page.waitForURL(/\/vehicles\/\d+$/);
    vehiclePath = new URL(page.url()).pathname;
    // The Sign-off card's empty state before any drive log.
    await page
      .getByRole("region", { name: "Sign-off" })
      .getByText("No analysed drive logs yet")
      .waitFor();

    await page.getByText("Add a target").click();
    let form = page.locator("#target-new");
    await form.getByLabel("Name").fill("Idle isolation");
    await form.getByLabel(/From engine speed/).fill("775");
    await form.getByLabel(/To engine speed/).fill("825");
    await form.getByLabel(/Minimum isolation/).fill(minDb);
    await form.getByRole("button", { name: "Add target" }).click();
    await page.getByText("The target “Idle isolation” is added").waitFor();
    await page.getByText("Add a target").click();
    form = page.locator("#target-new");
    await form.getByLabel("Name").fill("Idle rattle");
    await form.getByLabel("What it limits").selectOption("rattle");
    await form.getByLabel(/Maximum angular acceleration/).fill(String(rattleLimit));
    await form.getByRole("button", { name: "Add target" }).click();
    await page.getByText("The target “Idle rattle” is added").waitFor();

    await page.locator("#upload-files").setInputFiles({
      name: logName,
      mimeType: "text/csv",
      buffer: Buffer.from(analyticIdleCsv(IDLE_800)),
    });
    const row = page.locator("fieldset", { hasText: logName });
    await row.getByLabel("Test condition").selectOption("idle-neutral");
    await page.getByRole("button", { name: "Upload 1 file" }).click();
    await page
      .getByText(`Analysis of ${logName} finished.`)
      .waitFor({ state: "attached", timeout: 60_000 });
    await page.goto(baseUrl + vehiclePath);
    const card = page.getByRole("region", { name: "Sign-off" });
    await card.getByText("No sign-off yet.").waitFor();
    await card.getByRole("link", { name: /Draft report \(PDF\)/ }).waitFor();
    await snap(page, "signoff-card-empty");
  });

  it("the engineer proposes: a failing claim is refused without a deviation, nothing typed is lost", async () => {
    const page = engineer;
    expect(vehiclePath).not.toBe("");
    await page.goto(baseUrl + vehiclePath);
    await page
      .getByRole("region", { name: "Sign-off" })
      .getByRole("link", { name: /Propose sign-off/ })
      .click();
    await page.waitForURL(/\/signoffs\/new\?damperVariant=/);
    // The passing isolation target is claimed with its log; the failing rattle one is not.
    await expect(page.getByLabel("Claim “Idle isolation”").isChecked()).resolves.toBe(true);
    await expect(page.getByLabel("Claim “Idle rattle”").isChecked()).resolves.toBe(false);
    const isolation = page.locator("fieldset", { hasText: "Claim “Idle isolation”" });
    await isolation.locator('[data-claim-status="pass"]').waitFor();
    await expect(isolation.getByText(/least margin \+\d/).count()).resolves.toBe(1);

    const rattle = page.locator("fieldset", { hasText: "Claim “Idle rattle”" });
    await page.getByLabel("Claim “Idle rattle”").check();
    await rattle.getByLabel(new RegExp(logName)).check();
    // The live check: the named log fails the rattle limit; a deviation field appears.
    await rattle.locator('[data-claim-status="fail"]').waitFor();
    const deviation = rattle.getByLabel(/Deviation: why the claim is accepted anyway/);
    await deviation.waitFor();
    await page.getByLabel("Note").fill(`Kestrel idle release ${tag}`);
    await snap(page, "signoff-propose-live-check");

    // Sent without the deviation: the server refuses on the deviation's field; the note, the
    // ticked claims and logs are still there.
    await page.getByRole("button", { name: "Propose sign-off" }).click();
    await rattle.getByText(/A named drive log fails this target/).waitFor();
    await expect(deviation.getAttribute("aria-invalid")).resolves.toBe("true");
    await expect(page.getByLabel("Note").inputValue()).resolves.toBe(`Kestrel idle release ${tag}`);
    await expect(page.getByLabel("Claim “Idle rattle”").isChecked()).resolves.toBe(true);
    expect(page.url()).toMatch(/\/signoffs\/new/);
    await snap(page, "signoff-propose-refused");

    await deviation.fill("Idle rattle is judged on the vehicle by the NVH jury; figure accepted.");
    await rattle.locator('[data-claim-status="fail"]').getByText("— deviation recorded").waitFor();
    await page.getByRole("button", { name: "Propose sign-off" }).click();
    await page.waitForURL(/\/signoffs\/\d+\?notice=proposed$/);
    signoffPath = new URL(page.url()).pathname;
    await page.locator('h1 [data-signoff-state="proposed"]').waitFor();
    await page.getByText("Awaiting approval").first().waitFor();
    // Four eyes: the proposer reads why they cannot decide instead of the buttons.
    await page
      .getByText("You proposed this sign-off; a second person must approve or reject it.")
      .waitFor();
    await expect(page.getByRole("button", { name: "Approve sign-off" }).count()).resolves.toBe(0);
    const claims = page.getByTestId("signoff-claims");
    await claims.locator('[data-status="pass"]').getByText("Idle isolation").waitFor();
    await claims
      .locator('[data-status="fail"]')
      .getByText(/Deviation:/)
      .waitFor();
    await page.getByTestId("signoff-evidence").getByText(logName).waitFor();
    await snap(page, "signoff-proposed");
  });

  it("the admin approves with a comment; the digest is shown", async () => {
    const page = admin;
    expect(signoffPath).not.toBe("");
    await page.goto(baseUrl + vehiclePath);
    const card = page.getByRole("region", { name: "Sign-off" });
    await card.locator("[data-decide]").getByRole("link", { name: "Approve or reject" }).click();
    await page.waitForURL((url) => url.pathname === signoffPath);
    await page.getByLabel("Comment (optional)").fill("Released for the Kestrel programme.");
    await page.getByRole("button", { name: "Approve sign-off" }).click();
    await page.getByRole("status").filter({ hasText: "The sign-off is approved" }).waitFor();
    await page.locator('h1 [data-signoff-state="approved"]').waitFor();
    approvedDigest = ((await page.locator("[data-digest]").textContent()) ?? "").trim();
    expect(approvedDigest).toMatch(/^[0-9a-f]{64}$/);
    // The page's digest is the API's (GET /api/v1/signoffs/:id, issue 16 §4).
    const id = signoffPath.split("/").pop();
    const api = await page.request.get(`${baseUrl}/api/v1/signoffs/${id}`);
    expect(api.status()).toBe(200);
    const json = (await api.json()) as { signoff: { state: string; digest: string } };
    expect(json.signoff.state).toBe("approved");
    expect(json.signoff.digest).toBe(approvedDigest);
    await page.getByTestId("signoff-history").locator('[data-step="approved"]').waitFor();
    await snap(page, "signoff-approved");
  });

  it("the admin downloads the evidence report: a PDF with the vehicle and variant on every page", async () => {
    const page = admin;
    await page.goto(baseUrl + signoffPath);
    approvedPdf = await download(page, "Evidence report (PDF)");
    // A PDF file starts with "%PDF-" (ISO 32000-1 §7.5.2, the file header).
    expect(approvedPdf.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    const { pages, text } = await readPdf(approvedPdf);
    expect(pages).toBeGreaterThanOrEqual(2);
    for (const t of text) expect(t).toContain(`SGN-${tag}`);
    expect(text.join(" ")).toContain(logName);
  });

  it("the engineer shares the sign-off read-only: the guest sees the evidence and the report, nothing else", async () => {
    const page = engineer;
    await page.goto(baseUrl + signoffPath);
    const panel = page.locator("[data-share-panel]");
    await panel.getByText("Make a share link").click();
    // A sign-off's link never carries a raw file: no such checkbox.
    await expect(panel.getByLabel("Allow downloading the raw file").count()).resolves.toBe(0);
    await panel.getByRole("button", { name: "Make share link" }).click();
    const shown = panel.getByLabel(/Copy the share link now/);
    await shown.waitFor();
    const url = await shown.inputValue();
    const guest = await (await browser.newContext()).newPage();
    await guest.goto(url);
    await guest.locator("[data-shared-signoff]").waitFor();
    await guest.locator('[data-signoff-state="approved"]').waitFor();
    await guest.getByTestId("signoff-evidence").getByText(logName).waitFor();
    // Names only: no e-mail address of the team on the shared page.
    expect(await guest.content()).not.toContain("@twistlog.test");
    // No drive-log page is linked, and the link reaches no raw file.
    await expect(guest.locator('a[href*="/logs/"]').count()).resolves.toBe(0);
    expect((await guest.request.get(`${url}/file`)).status()).not.toBe(200);
    const shared = await download(guest, "Evidence report (PDF)");
    expect(approvedPdf).not.toBeNull();
    expect(shared.equals(approvedPdf!)).toBe(true);
    await snap(guest, "signoff-shared");
    await guest.context().close();
  });

  it("a re-analysis of the claimed drive log supersedes the sign-off; its report stays the same", async () => {
    const page = engineer;
    await page.goto(baseUrl + signoffPath);
    await page.getByTestId("signoff-evidence").getByRole("link", { name: logName }).click();
    await page.waitForURL(/\/logs\/\d+$/);
    // The same settings again: a new analysis version all the same (the earlier is kept).
    await page.locator("#reanalyse").getByRole("button", { name: "Re-analyse" }).click();
    await page.getByText("A new analysis version is queued").waitFor();
    const id = signoffPath.split("/").pop();
    // The new version is saved by the analysis worker: ask the page until it says so.
    let state = "";
    for (let i = 0; i < 120 && state !== "superseded"; i++) {
      await page.waitForTimeout(500);
      const r = await page.request.get(`${baseUrl}/api/v1/signoffs/${id}`);
      state = ((await r.json()) as { signoff: { state: string } }).signoff.state;
    }
    expect(state).toBe("superseded");
    await page.goto(baseUrl + signoffPath);
    await page.locator('h1 [data-signoff-state="superseded"]').waitFor();
    const reason = page.locator("[data-closed-reason]");
    await reason.getByText(`Drive log "${logName}" was re-analysed`).waitFor();
    // The record is not changed: the same digest, and the stored report byte for byte.
    await expect(page.locator("[data-digest]").textContent()).resolves.toBe(approvedDigest);
    const again = await download(page, "Evidence report (PDF)");
    expect(approvedPdf).not.toBeNull();
    expect(again.equals(approvedPdf!)).toBe(true);
    await snap(page, "signoff-superseded");
    // The vehicle page's card says so in words.
    await page.goto(baseUrl + vehiclePath);
    await page
      .getByRole("region", { name: "Sign-off" })
      .locator('[data-signoff-state="superseded"]')
      .waitFor();
    await snap(page, "signoff-card-superseded");
  });
});

describe("who approves sign-offs (team page)", () => {
  it("everyone reads the setting; only an admin has the form", async () => {
    await admin.goto(`${baseUrl}/team`);
    const card = admin.getByRole("region", { name: "Sign-off approvers" });
    // The demo team as seeded (left unchanged: other browser tests may run at the same time;
    // the change itself is a matrix row, tests/integration/authorization-matrix.table.ts).
    const shown = await card
      .locator("[data-signoff-approvers]")
      .getAttribute("data-signoff-approvers");
    expect(["engineers", "admins"]).toContain(shown);
    await expect(
      card
        .getByLabel(
          shown === "engineers"
            ? "Any engineer or admin other than the proposer"
            : "Only an admin other than the proposer",
        )
        .isChecked(),
    ).resolves.toBe(true);
    await snap(admin, "signoff-approvers-admin");
    await engineer.goto(`${baseUrl}/team`);
    const read = engineer.getByRole("region", { name: "Sign-off approvers" });
    await read.getByText("Admins change who approves.").waitFor();
    await expect(read.getByRole("radio").count()).resolves.toBe(0);
  });
});
