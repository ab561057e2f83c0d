import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { TransientEvent } from "~/lib/signal/result-schema";
import { baseUrl, inkOf, launchBrowser } from "./browser";
import { apiJson, demoVehicleId, waitForDemoLogs, type DemoLog } from "./demo-logs";
import { signIn, snap } from "./sign-in";

// Issue 15 on the drive-log page, in Chromium, on the seeded demo engine-start log of KST-D4
// (key start, idle, key-off and the free stop: samples/README.md): the "Starts and stops" panel
// lists the events of the API's result JSON, the speed trace marks them, the twist curve draws,
// and nothing scrolls sideways at 390 px.

let browser: Browser;
let engineer: Page;
let vehicleId: number;
let log: DemoLog;
let events: TransientEvent[];

beforeAll(async () => {
  browser = await launchBrowser();
  engineer = await signIn(browser, "engineer@twistlog.test");
  vehicleId = await demoVehicleId(engineer, "KST-D4");
  log = await waitForDemoLogs(
    engineer,
    vehicleId,
    (logs) => {
      const l = logs.find((x) => x.fileName.includes("engine-start"));
      return l && (l.status === "done" || l.status === "failed") ? l : undefined;
    },
    "the demo engine-start log",
  );
  expect(log.status, log.fileName).toBe("done");
  const result = await apiJson<{ events?: TransientEvent[] }>(
    engineer,
    `/api/v1/logs/${log.id}/result`,
  );
  events = result.events ?? [];
}, 300_000);
afterAll(async () => {
  await browser?.close();
});

describe("starts and stops on the drive-log page", () => {
  it("finds the demo's key start and its key-off stop", () => {
    // The demo schedule (samples/README.md): standstill → cranking → idle, then key-off at 20 s.
    expect(events.map((e) => e.kind)).toEqual(["start", "stop"]);
    const stop = events[1]!;
    expect(stop.startS).toBeGreaterThanOrEqual(19);
    // Damper A of KST-D4 (samples/README.md: k = 8 N·m/°, J2 = 0.07 kg·m², ζ 0.12): the gearbox
    // side of a base-excited two-mass system swings most near ωn = √(k/J2) (Den Hartog,
    // Mechanical Vibrations, §2.7) = √(8·180/π / 0.07) = 80.9 rad/s = 12.9 Hz, at the firing
    // order 2 an engine speed of 12.9 · 60 / 2 = 386 rpm. Tolerance 10 % (ours: 50 rpm bins of a
    // speed sweeping through the resonance).
    const fnRpm = ((Math.sqrt((8 * 180) / Math.PI / 0.07) / (2 * Math.PI)) * 60) / 2;
    for (const e of events) {
      expect(e.resonanceRpm, `${e.kind} resonance`).not.toBeNull();
      expect(Math.abs(e.resonanceRpm! - fnRpm) / fnRpm, `${e.kind} resonance`).toBeLessThan(0.1);
    }
  });

  it("lists the events in the Starts and stops panel with the result's figures", async () => {
    const page = engineer;
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${baseUrl}/vehicles/${vehicleId}/logs/${log.id}`);
    const panel = page.locator('[data-panel="starts-and-stops"]');
    await expect(panel.getByRole("heading", { name: "Starts and stops" }).count()).resolves.toBe(1);
    const rows = panel.locator("tbody tr");
    await expect(rows.count()).resolves.toBe(events.length);
    for (const [i, e] of events.entries()) {
      const cells = (await rows.nth(i).locator("th, td").allTextContents()).map((t) => t.trim());
      expect(cells[0]).toBe(e.kind === "start" ? "Start" : "Stop");
      // The same figures as the result JSON, rounded as format.ts says (rpm whole, dB and s one
      // decimal); the rounding is done here with toFixed on values that are not ties.
      expect(cells[2]).toBe(String(Math.round(e.resonanceRpm!)));
      expect(Number(cells[3]!.replace("−", "-"))).toBeCloseTo(e.peakAmplificationDb!, 1);
      expect(Number(cells[6])).toBeCloseTo(e.twistPeakToPeakDeg, 1);
    }
    // The demo vehicle's damper travel limit (a demo value, seeded) gives each event's end-stop
    // margin: the limit minus the peak-to-peak twist (docs/ui.md, the margin rule).
    const { vehicle } = await apiJson<{ vehicle: { damperTravelLimitDeg: number | null } }>(
      page,
      `/api/v1/vehicles/${vehicleId}`,
    );
    expect(vehicle.damperTravelLimitDeg).not.toBeNull();
    for (const [i, e] of events.entries()) {
      const cells = (await rows.nth(i).locator("th, td").allTextContents()).map((t) => t.trim());
      const margin = /[−-]?\d+(\.\d+)?/.exec(cells[7]!)?.[0] ?? "";
      expect(Number(margin.replace("−", "-"))).toBeCloseTo(
        vehicle.damperTravelLimitDeg! - e.twistPeakToPeakDeg,
        1,
      );
    }
    await expect(panel.getByRole("complementary").textContent()).resolves.toMatch(/local codes/i);
  });

  it("marks the events on the speed trace and draws the twist curve", async () => {
    const page = engineer;
    for (const chart of ["speed-trace", "twist-curve"]) {
      await page
        .locator(`[data-chart="${chart}"][data-status="ready"]`)
        .waitFor({ timeout: 20_000 });
      expect(await inkOf(page, `[data-chart="${chart}"]`), chart).toBeGreaterThan(0.005);
    }
    const trace = page.locator('[data-chart="speed-trace"]');
    await expect(trace.locator("li", { hasText: "Engine start or stop" }).count()).resolves.toBe(1);
    await expect(trace.locator('p[id$="-summary"]').textContent()).resolves.toMatch(
      /Engine starts and stops: Start .*; Stop /,
    );
    await snap(page, "transients-1440");
  });

  it("keeps the page from scrolling sideways at 390 px", async () => {
    const page = engineer;
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`${baseUrl}/vehicles/${vehicleId}/logs/${log.id}`);
    await page.locator('[data-chart="twist-curve"][data-status="ready"]').waitFor();
    const wide = await page.evaluate(() => document.documentElement.scrollWidth);
    expect(wide).toBeLessThanOrEqual(390);
    await snap(page, "transients-390");
    await page.setViewportSize({ width: 1440, height: 900 });
  });
});
