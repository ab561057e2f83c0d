import { chromium, type Browser } from "playwright-core";

export const baseUrl = process.env.TWISTLOG_BASE_URL ?? "http://127.0.0.1:3101";

/** Debian's Chromium, headless, with no background network traffic (docs/stack-notes.md). */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
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
}
