import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { baseUrl, freshTag, launchBrowser } from "./browser";
import { apiJson, demoVehicleId, waitForDemoLogs, type DemoLog } from "./demo-logs";
import { signIn, snap } from "./sign-in";

// Details of the drive-log page's charts in Chromium against the seeded demo (the Kestrel
// programme): keyboard use of the speed trace and the order spectrum, one rounding rule for the
// isolation range in the chart's text alternative and the tables, and the caption strip of an
// exported PNG.

let browser: Browser;
let page: Page;
let log: { vehicleId: number; id: number; fileName: string };

beforeAll(async () => {
  browser = await launchBrowser();
  page = await signIn(browser, "engineer@twistlog.test");
  await page.setViewportSize({ width: 1440, height: 900 });
  const vehicleId = await demoVehicleId(page, "KST-D4");
  log = await waitForDemoLogs(
    page,
    vehicleId,
    (logs) => {
      const l = logs.find((x) => x.fileName.includes("runup-3rd-full-load-damper-a"));
      if (l?.status === "failed") throw new Error(`${l.fileName} failed to analyse`);
      return l?.status === "done" ? { vehicleId, id: l.id, fileName: l.fileName } : undefined;
    },
    "the demo run-up",
  );
  await page.goto(`${baseUrl}/vehicles/${log.vehicleId}/logs/${log.id}`);
}, 300_000);
afterAll(async () => {
  await browser?.close();
});

async function ready(chart: string) {
  await page.locator(`[data-chart="${chart}"][data-status="ready"]`).waitFor({ timeout: 20_000 });
}

describe("keyboard use of the speed trace and the order spectrum", () => {
  for (const [chart, button] of [
    ["speed-trace", "Download Speed trace as CSV"],
    ["order-spectrum", "Download Order spectrum as CSV"],
  ] as const)
    it(`${chart}: Tab reaches the plot, the arrow keys move the cursor and the readout`, async () => {
      await ready(chart);
      const figure = page.locator(`[data-chart="${chart}"]`);
      const readout = figure.locator("p[aria-live]");
      // From the chart's last export button, the next Tab stop is its plot.
      await figure.getByRole("button", { name: button, exact: true }).focus();
      await page.keyboard.press("Tab");
      const focused = page.locator(`[data-chart="${chart}"] [role="img"]:focus`);
      await expect(focused.count()).resolves.toBe(1);
      await expect(focused.getAttribute("aria-label")).resolves.toMatch(/arrow keys/);

      const hint = await readout.textContent();
      await page.keyboard.press("ArrowRight");
      await expect.poll(() => readout.textContent()).not.toBe(hint);
      const first = (await readout.textContent()) ?? "";
      // The readout names a figure by its rule: time in s with 1 decimal, or an order.
      expect(first).toMatch(chart === "speed-trace" ? /^\d+\.\d s · crank \d+ rpm/ : /order \d/);
      await page.keyboard.press("End");
      await expect.poll(() => readout.textContent()).not.toBe(first);
      const last = (await readout.textContent()) ?? "";
      await page.keyboard.press("ArrowLeft");
      await expect.poll(() => readout.textContent()).not.toBe(last);
      await snap(page, `keyboard-${chart}`);
    });
});

describe("one rounding rule for the isolation range", () => {
  it("the isolation curve's text alternative, the isolation table and the drive-log table agree", async () => {
    const result = await apiJson<{
      isolation: { rpm: number; dB: number; aboveNoise: boolean }[];
    }>(page, `/api/v1/logs/${log.id}/result`);
    // Expected from the API's numbers: bins above the noise floor, 1 decimal, rounded by
    // ECMA-402 Intl.NumberFormat (half away from zero), a true minus sign (U+2212).
    const trusted = result.isolation.filter((p) => p.aboveNoise).map((p) => p.dB);
    expect(trusted.length).toBeGreaterThan(1);
    const one = (x: number) =>
      new Intl.NumberFormat("en-US", { minimumFractionDigits: 1, maximumFractionDigits: 1 })
        .format(x)
        .replace("-", "\u2212");
    const expected = `${one(Math.min(...trusted))} to ${one(Math.max(...trusted))} dB`;

    await ready("isolation-curve");
    const summary =
      (await page.locator('[data-chart="isolation-curve"] p[id$="-summary"]').textContent()) ?? "";
    expect(/rpm: (.+? dB)/.exec(summary)?.[1]).toBe(expected);

    const table = (await page.locator("#isolation summary").textContent()) ?? "";
    expect(table).toContain(`, ${expected})`);

    await page.goto(`${baseUrl}/vehicles/${log.vehicleId}`);
    await expect(page.locator(`tr[data-log-id="${log.id}"]`).textContent()).resolves.toContain(
      expected,
    );
    await page.goto(`${baseUrl}/vehicles/${log.vehicleId}/logs/${log.id}`);
  });
});

describe("the exported PNG", () => {
  it("has a caption strip at the bottom that the chart on the page does not", async () => {
    await ready("isolation-curve");
    const figure = page.locator('[data-chart="isolation-curve"]');
    const plotHeight = await figure
      .locator("canvas")
      .first()
      .evaluate((c) => (c as HTMLCanvasElement).height);
    const [download] = await Promise.all([
      page.waitForEvent("download"),
      figure.getByRole("button", { name: "Download Isolation curve as PNG", exact: true }).click(),
    ]);
    const bytes = readFileSync((await download.path())!);
    // PNG (ISO/IEC 15948 §11.2.2): the IHDR chunk's width and height are big-endian at 16 and 20.
    const width = bytes.readUInt32BE(16);
    const height = bytes.readUInt32BE(20);
    expect(height).toBeGreaterThan(plotHeight);

    // Decode it in an empty page and look at the bottom rows: the strip's grey (#f5f5f5), with
    // dark text pixels on it. Without the caption the bottom rows are white padding.
    const decoder = await page.context().newPage();
    await decoder.goto("about:blank");
    const strip = await decoder.evaluate(async (b64) => {
      const img = new Image();
      img.src = `data:image/png;base64,${b64}`;
      await img.decode();
      const c = document.createElement("canvas");
      c.width = img.naturalWidth;
      c.height = img.naturalHeight;
      const ctx = c.getContext("2d")!;
      ctx.drawImage(img, 0, 0);
      const rows = Math.round(c.height * 0.04);
      const { data } = ctx.getImageData(0, c.height - rows, c.width, rows);
      let grey = 0;
      let dark = 0;
      for (let i = 0; i < data.length; i += 4) {
        const [r, g, bl] = [data[i]!, data[i + 1]!, data[i + 2]!];
        if (r === 245 && g === 245 && bl === 245) grey++;
        if (r < 160 && g < 160 && bl < 160) dark++;
      }
      return { grey: grey / (data.length / 4), dark, w: c.width, h: c.height };
    }, bytes.toString("base64"));
    await decoder.close();
    expect([strip.w, strip.h]).toEqual([width, height]);
    expect(strip.grey, "share of the strip's grey in the bottom rows").toBeGreaterThan(0.5);
    expect(strip.dark, "caption text pixels").toBeGreaterThan(20);
    // Keep a copy to look at.
    const dir = process.env.SCREENSHOT_DIR;
    if (dir) await download.saveAs(`${dir}/exported-isolation-curve.png`);
  });
});

describe("target labels on the isolation curve", () => {
  it("draws a target whose line crosses the curve, and states it by the rounding rules", async () => {
    // A vehicle of our own (the demo vehicles keep their seeded targets) with a target that
    // half the run-up's points miss, so points, line and label meet on the plot.
    const tag = freshTag();
    await page.goto(`${baseUrl}/vehicles/new`);
    await page.getByLabel("Name").fill(`Label estate ${tag}`);
    await page.getByLabel("Identifier").fill(`LBL-${tag}`);
    await page.getByLabel("Cylinders").fill("4");
    await page.getByRole("button", { name: "Add vehicle" }).click();
    await page.waitForURL(/\/vehicles\/\d+$/);
    const vehiclePath = new URL(page.url()).pathname;
    await page.getByText("Add a target").click();
    const form = page.locator("#target-new");
    await form.getByLabel("Name").fill("Kestrel mid-range");
    await form.getByLabel(/From engine speed/).fill("1000");
    await form.getByLabel(/To engine speed/).fill("3000");
    await form.getByLabel(/Minimum isolation/).fill("25.04");
    await form.getByRole("button", { name: "Add target" }).click();
    await page.getByText("The target “Kestrel mid-range” is added").waitFor();

    const name = "kestrel-kst-d4-runup-3rd-full-load-damper-a.csv";
    await page
      .locator("#upload-files")
      .setInputFiles(fileURLToPath(new URL(`../../samples/${name}`, import.meta.url)));
    await page
      .locator("fieldset", { hasText: name })
      .getByLabel("Test condition")
      .selectOption("run-up");
    await page.getByRole("button", { name: "Upload 1 file" }).click();
    await page
      .getByText(`Analysis of ${name} finished.`)
      .waitFor({ state: "attached", timeout: 90_000 });
    const vehicleId = Number(vehiclePath.split("/").pop());
    const { logs } = await apiJson<{ logs: DemoLog[] }>(page, `/api/v1/vehicles/${vehicleId}/logs`);
    await page.goto(`${baseUrl}${vehiclePath}/logs/${logs.find((l) => l.fileName === name)!.id}`);
    await ready("isolation-curve");
    const figure = page.locator('[data-chart="isolation-curve"]');
    // 25.04 dB by the dB rule (1 decimal), the range by the rpm rule.
    await expect(figure.locator('p[id$="-summary"]').textContent()).resolves.toContain(
      "Kestrel mid-range at least 25.0 dB over 1000–3000 rpm",
    );
    await figure.scrollIntoViewIfNeeded();
    // For looking at the label over the points (the unit test checks the drawing order).
    const dir = process.env.SCREENSHOT_DIR;
    if (dir) await figure.screenshot({ path: `${dir}/isolation-target-label.png` });
  }, 180_000);
});
