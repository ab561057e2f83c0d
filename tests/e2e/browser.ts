import { chromium, type Browser, type Page } from "playwright-core";

export const baseUrl = process.env.TWISTLOG_BASE_URL ?? "http://127.0.0.1:3101";

const launched = new Set<Browser>();

/**
 * A tag for names that must be unique (a vehicle's identifier): a new one per call, so a test's
 * retry (vitest.e2e.config.ts) never meets what its failed attempt made.
 */
export function freshTag(): string {
  return `${Date.now().toString(36)}${Math.random().toString(36).slice(2, 4)}`.toUpperCase();
}

/** Debian's Chromium, headless, with no background network traffic (docs/stack-notes.md). */
export async function launchBrowser(): Promise<Browser> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
      "--no-first-run",
    ],
  });
  launched.add(browser);
  browser.on("disconnected", () => launched.delete(browser));
  return browser;
}

/**
 * What every page still open shows: its address and the start of its main content's text. A
 * failed test leaves its pages open (it closes them only at its end), so this is what the user
 * would have seen when a wait ran out (tests/e2e/failure-report.ts prints it). A page that does
 * not answer within 5 s is reported as such.
 */
export async function openPagesReport(): Promise<string> {
  const lines: string[] = [];
  const unanswered = () =>
    new Promise<string>((resolve) => setTimeout(resolve, 5000, "(no answer within 5 s)").unref());
  for (const browser of launched)
    for (const context of browser.contexts())
      for (const page of context.pages()) {
        const text = await Promise.race([
          page
            .evaluate(() => (document.querySelector("main") ?? document.body)?.innerText ?? "")
            .catch((error: Error) => `(unreadable: ${error.message})`),
          unanswered(),
        ]);
        lines.push(`${page.url()}\n  ${text.replace(/\s+/g, " ").trim().slice(0, 800)}`);
      }
  return lines.join("\n");
}

/** Share of a canvas' pixels that are neither transparent nor white: > 0 means something is drawn. */
export async function inkOf(page: Page, selector: string): Promise<number> {
  const canvas = page.locator(`${selector} canvas`).first();
  await canvas.waitFor();
  return canvas.evaluate((el) => {
    const c = el as HTMLCanvasElement;
    const ctx = c.getContext("2d");
    if (!ctx || c.width === 0 || c.height === 0) return 0;
    const { data } = ctx.getImageData(0, 0, c.width, c.height);
    let ink = 0;
    for (let i = 0; i < data.length; i += 4)
      if (data[i + 3]! > 0 && (data[i]! < 245 || data[i + 1]! < 245 || data[i + 2]! < 245)) ink++;
    return ink / (data.length / 4);
  });
}
