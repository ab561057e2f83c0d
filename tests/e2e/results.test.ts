import { readFileSync } from "node:fs";
import Papa from "papaparse";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { baseUrl, inkOf, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// Reading results in Chromium against the seeded demo (the Kestrel programme, scripts/seed.ts):
// the drive-log page's charts, the linked cursor, unit switching, PNG/CSV export checked against
// the API's result JSON, the comparison of the two damper variants, the rattle check, and what a
// viewer may do. The production server analyses the 8 demo drive logs after it starts; the
// tests wait for them through the API.

let browser: Browser;
let engineer: Page;

interface ApiLog {
  id: number;
  fileName: string;
  status: string;
  damperVariant: string;
}
interface Demo {
  vehicleId: number;
  runupA: ApiLog;
  runupB: ApiLog;
  idle: ApiLog;
}
let demo: Demo;

async function api<T>(page: Page, path: string): Promise<T> {
  const r = await page.request.get(`${baseUrl}${path}`);
  expect(r.status(), path).toBe(200);
  return (await r.json()) as T;
}

/** The demo vehicle KST-D4 and its drive logs, once their analyses are done. */
async function demoLogs(page: Page): Promise<Demo> {
  const { vehicles } = await api<{ vehicles: { id: number; identifier: string }[] }>(
    page,
    "/api/v1/vehicles",
  );
  const vehicle = vehicles.find((v) => v.identifier === "KST-D4");
  expect(vehicle, "the demo vehicle KST-D4 is seeded").toBeTruthy();
  for (let i = 0; i < 240; i++) {
    const { logs } = await api<{ logs: ApiLog[] }>(page, `/api/v1/vehicles/${vehicle!.id}/logs`);
    const find = (part: string) => logs.find((l) => l.fileName.includes(part));
    const wanted = [
      find("runup-3rd-full-load-damper-a"),
      find("runup-3rd-full-load-damper-b"),
      find("idle-neutral"),
    ];
    if (wanted.every((l) => l && (l.status === "done" || l.status === "failed"))) {
      for (const l of wanted) expect(l!.status, l!.fileName).toBe("done");
      return { vehicleId: vehicle!.id, runupA: wanted[0]!, runupB: wanted[1]!, idle: wanted[2]! };
    }
    await page.waitForTimeout(1000);
  }
  throw new Error("the demo drive logs were not analysed within 4 minutes");
}

async function ready(page: Page, chart: string) {
  await page.locator(`[data-chart="${chart}"][data-status="ready"]`).waitFor({ timeout: 20_000 });
}

async function download(page: Page, name: string): Promise<{ path: string; file: string }> {
  const [d] = await Promise.all([
    page.waitForEvent("download"),
    page.getByRole("button", { name, exact: true }).click(),
  ]);
  const path = await d.path();
  return { path: path!, file: d.suggestedFilename() };
}

beforeAll(async () => {
  browser = await launchBrowser();
  engineer = await signIn(browser, "engineer@twistlog.test");
  demo = await demoLogs(engineer);
}, 300_000);
afterAll(async () => {
  await browser?.close();
});

const CHARTS = [
  "speed-trace",
  "order-curves",
  "isolation-curve",
  "order-map-crank",
  "order-map-gearbox",
  "order-spectrum",
];

describe("the drive-log page's charts", () => {
  it("draws every chart with data", async () => {
    const page = engineer;
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${baseUrl}/vehicles/${demo.vehicleId}/logs/${demo.runupA.id}`);
    for (const chart of CHARTS) {
      await ready(page, chart);
      expect(await inkOf(page, `[data-chart="${chart}"]`), chart).toBeGreaterThan(0.005);
    }
    await snap(page, "drive-log-1440");
    await page.setViewportSize({ width: 1024, height: 768 });
    await page.waitForTimeout(300);
    for (const chart of CHARTS)
      expect(await inkOf(page, `[data-chart="${chart}"]`), `${chart} at 1024 px`).toBeGreaterThan(
        0.005,
      );
    await snap(page, "drive-log-1024");
    await page.setViewportSize({ width: 1440, height: 900 });
  });

  it("moves the order spectrum with the engine-speed cursor", async () => {
    const page = engineer;
    const spectrum = page.locator('[data-chart="order-spectrum"]');
    const plot = page.locator('[data-chart="isolation-curve"] .u-over');
    await plot.waitFor();
    await plot.scrollIntoViewIfNeeded();
    const box = (await plot.boundingBox())!;
    // Before any move the spectrum shows a row of its own choosing; each move must change it.
    const rpmOf = async () => Number(await spectrum.getAttribute("data-rpm"));
    const initial = await rpmOf();
    await page.mouse.move(box.x + box.width * 0.9, box.y + box.height / 2);
    await expect.poll(rpmOf).not.toBe(initial);
    const high = await rpmOf();
    await page.mouse.move(box.x + box.width * 0.1, box.y + box.height / 2);
    await expect.poll(rpmOf).toBeLessThan(high);
    // The title names the engine speed it shows.
    const rpm = Number(await spectrum.getAttribute("data-rpm"));
    await expect(spectrum.locator("h3").textContent()).resolves.toContain(`${Math.round(rpm)} rpm`);
  });

  it("switches the order curves' unit and the axis with it", async () => {
    const page = engineer;
    const chart = page.locator('[data-chart="order-curves"]');
    await expect(chart.getAttribute("data-unit")).resolves.toBe("rpm");
    const summary = chart.locator('p[id$="-summary"]');
    const canvas = chart.locator("canvas").first();
    const pixels = () => canvas.evaluate((c) => (c as HTMLCanvasElement).toDataURL());
    await expect(summary.textContent()).resolves.not.toContain("rad/s²");
    const before = await pixels();
    // The radios are visually hidden inside their labels (a segmented switch): click the label.
    await chart.locator("label", { hasText: /^rad\/s²$/ }).click();
    await expect.poll(() => chart.getAttribute("data-unit")).toBe("rad/s²");
    // The text alternative states the new unit, and the plot (axis label and scale) is redrawn.
    await expect.poll(async () => (await summary.textContent()) ?? "").toContain("rad/s²");
    await expect.poll(pixels).not.toBe(before);
    expect(await inkOf(page, '[data-chart="order-curves"]')).toBeGreaterThan(0.005);
    await chart.locator("label", { hasText: /^rpm$/ }).click();
    await expect.poll(() => chart.getAttribute("data-unit")).toBe("rpm");
  });

  it("exports the isolation curve as CSV with the API's numbers, and as a PNG image", async () => {
    const page = engineer;
    const result = await api<{ firingOrder: number; isolation: { rpm: number; dB: number }[] }>(
      page,
      `/api/v1/logs/${demo.runupA.id}/result`,
    );
    const csv = await download(page, "Download Isolation curve as CSV");
    expect(csv.file).toMatch(/\.csv$/);
    const parsed = Papa.parse<string[]>(readFileSync(csv.path, "utf8").trim(), {
      skipEmptyLines: true,
    });
    const [header, ...rows] = parsed.data;
    const rpmCol = header!.findIndex((h) => /engine speed/i.test(h) && /rpm/.test(h));
    const dbCol = header!.findIndex((h) => /isolation/i.test(h) && /dB/.test(h));
    expect(rpmCol).toBeGreaterThanOrEqual(0);
    expect(dbCol).toBeGreaterThanOrEqual(0);
    const fromCsv = rows.map((r) => [Number(r[rpmCol]), Number(r[dbCol])]);
    expect(fromCsv).toEqual(result.isolation.map((p) => [p.rpm, p.dB]));

    const png = await download(page, "Download Isolation curve as PNG");
    expect(png.file).toMatch(/\.png$/);
    // PNG signature (ISO/IEC 15948 / RFC 2083 §3.1): 89 50 4E 47 0D 0A 1A 0A.
    expect([...readFileSync(png.path).subarray(0, 8)]).toEqual([
      0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a,
    ]);
  });

  it("keeps the chart JSON of a demo drive log under 300 KB", async () => {
    const r = await engineer.request.get(
      `${baseUrl}/vehicles/${demo.vehicleId}/logs/${demo.runupA.id}/charts.json`,
    );
    expect(r.status()).toBe(200);
    expect((await r.body()).length).toBeLessThan(300 * 1024);
  });
});

describe("comparison of the two demo damper variants", () => {
  it("shows the band table and a verdict consistent with its numbers", async () => {
    const page = engineer;
    await page.goto(`${baseUrl}/vehicles/${demo.vehicleId}`);
    await page.goto(
      `${baseUrl}/vehicles/${demo.vehicleId}/compare?logs=${demo.runupA.id},${demo.runupB.id}`,
    );
    const verdict = (await page
      .getByTestId("comparison-verdict")
      .locator("p")
      .first()
      .textContent())!;
    expect(verdict).toMatch(/^Variant B isolates /);
    const rows = await page
      .getByTestId("band-table")
      .locator("tbody tr")
      .evaluateAll((trs) =>
        trs.map((tr) => ({
          from: Number(tr.getAttribute("data-from-rpm")),
          cells: [...tr.querySelectorAll("td")].map((td) => td.textContent ?? ""),
        })),
      );
    expect(rows.length).toBeGreaterThan(5);
    const change = (cell: string) =>
      Number(cell.replace("−", "-").replace("±", "").replace("+", ""));
    // Each phrase "X dB more|less between A and B rpm" (or "above A rpm") must be the mean of
    // the table's change column over those bands.
    const phrases = [
      ...verdict.matchAll(/(\d+\.\d) dB (more|less) (?:between (\d+) and (\d+)|above (\d+)) rpm/g),
    ];
    expect(phrases.length).toBeGreaterThan(0);
    for (const m of phrases) {
      const from = Number(m[3] ?? m[5]);
      const to = m[4] ? Number(m[4]) : Infinity;
      const inRun = rows.filter((r) => r.from >= from && r.from < to && r.cells[2] !== "—");
      expect(inRun.length, m[0]).toBeGreaterThan(0);
      const mean = inRun.reduce((s, r) => s + change(r.cells[2]!), 0) / inRun.length;
      expect(Math.sign(mean), m[0]).toBe(m[2] === "more" ? 1 : -1);
      expect(Math.abs(mean), m[0]).toBeCloseTo(Number(m[1]), 0);
      // The better column agrees with the sign in every band of the run that passes 0.5 dB.
      for (const r of inRun)
        if (Math.abs(change(r.cells[2]!)) >= 0.5)
          expect(r.cells[3], `${r.from} rpm`).toContain(
            m[2] === "more" ? "Variant B" : "Variant A",
          );
    }
    for (const chart of ["overlay-isolation", "overlay-order"]) {
      await ready(page, chart);
      expect(await inkOf(page, `[data-chart="${chart}"]`), chart).toBeGreaterThan(0.005);
    }
    await snap(page, "comparison-1440");
    await page.setViewportSize({ width: 1024, height: 768 });
    await page.waitForTimeout(300);
    await snap(page, "comparison-1024");
    await page.setViewportSize({ width: 1440, height: 900 });
  });
});

describe("the rattle check", () => {
  it("shows the idle log's angular acceleration against the limit and reads it in plain words", async () => {
    const page = engineer;
    await page.goto(`${baseUrl}/vehicles/${demo.vehicleId}/logs/${demo.idle.id}/rattle`);
    const result = await api<{
      idle: { gearboxAngAccelRadS2: number; limitRadS2: number; verdict: string };
    }>(page, `/api/v1/logs/${demo.idle.id}/result`);
    await page
      .getByRole("heading", {
        name: result.idle.verdict === "ok" ? /Within the limit/ : /Over the limit/,
      })
      .waitFor();
    await page
      .getByText(`${result.idle.gearboxAngAccelRadS2.toFixed(0)} rad/s²`)
      .first()
      .waitFor();
    await page
      .getByText(/screening aid/)
      .first()
      .waitFor();
    for (const chart of ["rattle-accel", "rattle-fluctuation"]) {
      await ready(page, chart);
      expect(await inkOf(page, `[data-chart="${chart}"]`), chart).toBeGreaterThan(0.005);
    }
    await snap(page, "rattle-1440");
    await page.setViewportSize({ width: 1024, height: 768 });
    await page.waitForTimeout(300);
    await snap(page, "rattle-1024");
    await page.setViewportSize({ width: 1440, height: 900 });
  });
});

describe("a viewer", () => {
  it("sees the charts, the comparison and the rattle check, but no way to set targets or share", async () => {
    const page = await signIn(browser, "viewer@twistlog.test");
    await page.goto(`${baseUrl}/vehicles/${demo.vehicleId}/logs/${demo.runupB.id}`);
    for (const chart of CHARTS) await ready(page, chart);
    await expect(page.getByText("Make a share link").count()).resolves.toBe(0);
    await page.goto(`${baseUrl}/vehicles/${demo.vehicleId}`);
    await page.getByRole("heading", { name: "Targets" }).waitFor();
    await expect(page.getByText("Add a target").count()).resolves.toBe(0);
    await page.goto(
      `${baseUrl}/vehicles/${demo.vehicleId}/compare?logs=${demo.runupA.id},${demo.runupB.id}`,
    );
    await page.getByTestId("band-table").waitFor();
    await page.goto(`${baseUrl}/vehicles/${demo.vehicleId}/logs/${demo.idle.id}/rattle`);
    await ready(page, "rattle-accel");
    await page.context().close();
  });
});
