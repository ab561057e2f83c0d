import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createApiToken } from "~/lib/data/api-tokens.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { VehicleTrend } from "~/lib/domain/trend";
import { vehicleSchema } from "~/lib/domain/vehicle-schema";
import { createTestTeam, TEST_PASSWORD, type TestTeam } from "../support/accounts";
import { bearerFetch, uploadTrendLogs } from "../support/trend-logs";
import { baseUrl, inkOf, launchBrowser } from "./browser";
import { signIn, snap } from "./sign-in";

// Issue 15 §4 in Chromium: "a vehicle with a sequence of analytic logs whose natural frequency
// rises by 15 % shows the rise and the flag". A team and vehicle of their own; four analytic
// drive logs of damper variant A whose two-mass system's natural frequency is set in the signal
// (tests/support/trend-logs.ts) at 12.0, 12.6, 13.2 and 13.8 Hz: +15 % from the first.

const SEQUENCE = [
  { fnHz: 12.0, testDate: "2026-11-04" },
  { fnHz: 12.6, testDate: "2026-11-18" },
  { fnHz: 13.2, testDate: "2026-12-02" },
  { fnHz: 13.8, testDate: "2026-12-16" },
];

let browser: Browser;
let team: TestTeam;
let page: Page;
let vehicleId = 0;

beforeAll(async () => {
  browser = await launchBrowser();
  team = await createTestTeam("Trend");
  vehicleId = await vehicleData(team.id).create(
    vehicleSchema.parse({
      name: "Kestrel durability estate 2.0 diesel",
      identifier: "KST-DUR1",
      cylinders: 4,
      stroke: 4,
      damperVariant: "A",
    }),
  );
  const { token } = await createApiToken({
    userId: team.accounts.engineer.id,
    teamId: team.id,
    name: "damper health",
    expiresAt: null,
  });
  await uploadTrendLogs(bearerFetch(baseUrl, token), vehicleId, SEQUENCE);
  page = await signIn(browser, team.accounts.engineer.email, TEST_PASSWORD);
}, 300_000);
afterAll(async () => {
  await browser?.close();
});

describe("damper health over time on the vehicle page", () => {
  it("shows the natural frequency's 15 % rise and flags it", async () => {
    await page.setViewportSize({ width: 1440, height: 900 });
    await page.goto(`${baseUrl}/vehicles/${vehicleId}`);
    const card = page.locator("section", {
      has: page.getByRole("heading", { name: "Damper health over time" }),
    });
    const variant = card.locator('section[data-variant="A"]');
    await variant.waitFor();

    // The figures table (the charts' text alternative): one row per drive log, by test date.
    await variant.locator("summary", { hasText: "as a table" }).click();
    const rows = variant.locator("tbody tr");
    await expect(rows.count()).resolves.toBe(SEQUENCE.length);
    const fn = await rows.evaluateAll((trs) =>
      // A flagged figure carries a " (flagged) ⚠" after the number.
      trs.map((tr) => Number.parseFloat(tr.querySelectorAll("td")[2]!.textContent ?? "")),
    );
    // The analytic signals' natural frequencies rise by 13.8 / 12.0 − 1 = 15 %; the fit of each
    // log within 2 % of its own (tolerance ours), so the measured rise is 15 ± 4 %.
    fn.forEach((hz, i) =>
      expect(Math.abs(hz - SEQUENCE[i]!.fnHz) / SEQUENCE[i]!.fnHz).toBeLessThan(0.02),
    );
    expect(fn[3]! / fn[0]! - 1).toBeGreaterThan(0.11);
    expect(fn[3]! / fn[0]! - 1).toBeLessThan(0.19);

    // The flag, in a plain sentence naming the baseline's date (4 Nov 2026).
    const flags = (await variant.locator("[data-flags] li").allTextContents()).join(" ");
    expect(flags).toMatch(/natural frequency up 1[1-9] % since 4 Nov/i);

    // The API says the same (GET /api/v1/vehicles/:id/trend, app/lib/domain/trend.ts).
    const r = await page.request.get(`${baseUrl}/api/v1/vehicles/${vehicleId}/trend`);
    expect(r.status()).toBe(200);
    const trend = (await r.json()) as VehicleTrend;
    const api = trend.variants.find((v) => v.damperVariant === "A")!;
    expect(api.flags.some((f) => f.quantity === "naturalFrequencyHz")).toBe(true);
    expect(api.points.map((p) => p.date)).toEqual(SEQUENCE.map((s) => s.testDate));

    // The small multiple of the natural frequency draws.
    expect(await inkOf(page, '[data-chart="trend-naturalFrequencyHz"]')).toBeGreaterThan(0.005);
    await snap(page, "damper-health-1440");
  });

  it("keeps the card from scrolling the page sideways at 390 px", async () => {
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(`${baseUrl}/vehicles/${vehicleId}`);
    await page.locator('[data-chart="trend-naturalFrequencyHz"] canvas').first().waitFor();
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(
      390,
    );
    await snap(page, "damper-health-390");
  });
});
