import type { Browser, Page } from "playwright-core";
import { baseUrl } from "./browser";

export const DEMO_PASSWORD = "twistlog-demo";

/** Signs in through the real form in a fresh browser context; resolves on the page after it. */
export async function signIn(
  browser: Browser,
  email: string,
  password = DEMO_PASSWORD,
): Promise<Page> {
  const context = await browser.newContext();
  const page = await context.newPage();
  await page.goto(`${baseUrl}/sign-in`);
  await page.getByLabel("E-mail address").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => url.pathname !== "/sign-in");
  return page;
}

/** Signs out through the user menu. */
export async function signOut(page: Page): Promise<void> {
  await page.locator("summary", { hasText: /▾/ }).last().click();
  await page.getByRole("button", { name: "Sign out" }).click();
  await page.waitForURL(/\/sign-in\?notice=signed-out/);
}

/** Saves a screenshot when SCREENSHOT_DIR is set (for looking at the screens, not a check). */
export async function snap(page: Page, name: string): Promise<void> {
  const dir = process.env.SCREENSHOT_DIR;
  if (dir) await page.screenshot({ path: `${dir}/${name}.png`, fullPage: true });
}
