import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { baseUrl, launchBrowser } from "./browser";
import { demoVehicleId, waitForDemoLogs, type DemoLog } from "./demo-logs";
import { signIn, snap } from "./sign-in";

// Issue 11 §3.2 in Chromium against the seeded demo (the Kestrel programme, scripts/seed.ts):
// every way into the comparison of KST-D4's two run-ups (damper A, the vehicle's fitted variant,
// tested 4 Nov; damper B, tested 18 Nov) reads the same way round: the same reference, the same
// verdict sentence. The rule is in app/lib/domain/comparison-order.ts and README "Comparison".

let browser: Browser;
let page: Page;

let vehicleId: number;
let runupA: DemoLog;
let runupB: DemoLog;

beforeAll(async () => {
  browser = await launchBrowser();
  page = await signIn(browser, "engineer@twistlog.test");
  await page.setViewportSize({ width: 1440, height: 900 });
  vehicleId = await demoVehicleId(page, "KST-D4");
  [runupA, runupB] = await waitForDemoLogs(
    page,
    vehicleId,
    (logs) => {
      const a = logs.find((l) => l.fileName.includes("runup-3rd-full-load-damper-a"));
      const b = logs.find((l) => l.fileName.includes("runup-3rd-full-load-damper-b"));
      return a?.status === "done" && b?.status === "done" ? ([a, b] as const) : undefined;
    },
    "the demo run-ups",
  );
});
afterAll(async () => {
  await browser?.close();
});

/** The comparison page as a reader sees it: the reference, the verdict, the drive logs' order. */
async function reading() {
  await page.waitForURL(/\/compare\?logs=/);
  await page.getByTestId("band-table").waitFor();
  const verdict = page.getByTestId("comparison-verdict");
  return {
    verdict: await verdict.locator("p").first().textContent(),
    reference: await page.getByTestId("comparison-reference").textContent(),
    order: await page
      .getByRole("list", { name: "Drive logs compared" })
      .locator("li")
      .evaluateAll((lis) => lis.map((li) => li.textContent?.replace(/\s+/g, " ").trim() ?? "")),
  };
}

async function compareWith(from: DemoLog, other: DemoLog) {
  await page.goto(`${baseUrl}/vehicles/${vehicleId}/logs/${from.id}`);
  await page.getByLabel("Compare with").selectOption(String(other.id));
  await page.getByRole("button", { name: "Compare", exact: true }).click();
  return reading();
}

describe("the comparison of the two demo damper variants", () => {
  it("has the same reference and verdict from the vehicle page and from either drive log", async () => {
    await page.goto(`${baseUrl}/vehicles/${vehicleId}`);
    // The hint changes once the table is hydrated; ticking before that would be undone.
    await page.locator("#compare-hint", { hasText: /^Select 2 to/ }).waitFor();
    // The table lists the newest upload first; tick B, then A.
    await page.getByLabel(`Select ${runupB.fileName} for comparison`).check();
    await page.getByLabel(`Select ${runupA.fileName} for comparison`).check();
    await page.getByRole("button", { name: /^Compare selected/ }).click();
    const ticked = await reading();
    await snap(page, "comparison-reference");

    expect(ticked.reference).toBe(
      "Reference: variant A, the only drive log here with the vehicle's fitted damper variant (A).",
    );
    expect(ticked.verdict).toMatch(/^Variant B isolates .* than variant A\.$/);
    expect(ticked.order[0]).toMatch(/^1\s*Variant A\s*\(reference\)/);

    const fromA = await compareWith(runupA, runupB);
    const fromB = await compareWith(runupB, runupA);
    expect(fromA).toEqual(ticked);
    expect(fromB).toEqual(ticked);
  });

  it("reads the same from the suggested pair on Comparisons", async () => {
    await page.goto(`${baseUrl}/comparisons`);
    await snap(page, "comparisons-suggested");
    await page
      .getByRole("region", { name: /KST-D4/ })
      .getByRole("link", { name: "Run-up, gear 3: damper A (reference) vs B" })
      .click();
    const suggested = await reading();
    expect(suggested.reference).toContain("Reference: variant A");
    expect(suggested.verdict).toMatch(/^Variant B isolates .* than variant A\.$/);
  });
});
