import type { Page } from "playwright-core";
import { expect } from "vitest";
import { baseUrl } from "./browser";

// The seeded Kestrel demo as browser tests read it through the API with the page's session.

export interface DemoLog {
  id: number;
  vehicleId: number;
  fileName: string;
  status: string;
  damperVariant: string;
}

/** GET a JSON path with the page's session cookie; anything but 200 fails the test. */
export async function apiJson<T>(page: Page, path: string): Promise<T> {
  const r = await page.request.get(`${baseUrl}${path}`);
  expect(r.status(), path).toBe(200);
  return (await r.json()) as T;
}

/** The id of a seeded demo vehicle, e.g. "KST-D4". */
export async function demoVehicleId(page: Page, identifier: string): Promise<number> {
  const { vehicles } = await apiJson<{ vehicles: { id: number; identifier: string }[] }>(
    page,
    "/api/v1/vehicles",
  );
  const vehicle = vehicles.find((v) => v.identifier === identifier);
  expect(vehicle, `the demo vehicle ${identifier} is seeded`).toBeTruthy();
  return vehicle!.id;
}

/**
 * The server analyses the demo drive logs in the background after it starts: asks for the
 * vehicle's drive logs once a second until `ready` returns something, for at most 240 s.
 */
export async function waitForDemoLogs<T>(
  page: Page,
  vehicleId: number,
  ready: (logs: DemoLog[]) => T | undefined,
  what: string,
): Promise<T> {
  for (let i = 0; i < 240; i++) {
    const { logs } = await apiJson<{ logs: DemoLog[] }>(page, `/api/v1/vehicles/${vehicleId}/logs`);
    const found = ready(logs);
    if (found !== undefined) return found;
    await page.waitForTimeout(1000);
  }
  throw new Error(`${what} were not analysed within 4 minutes`);
}
