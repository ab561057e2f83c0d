import { readFileSync } from "node:fs";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { baseUrl, launchBrowser } from "./browser";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("landing page in Chromium", () => {
  it("uses the shipped Inter font and Tailwind's styles, and fetches nothing from outside", async () => {
    const page = await browser.newPage();
    const requested: string[] = [];
    const consoleErrors: string[] = [];
    page.on("request", (r) => requested.push(r.url()));
    page.on("console", (m) => m.type() === "error" && consoleErrors.push(m.text()));

    const response = await page.goto(baseUrl, { waitUntil: "networkidle" });
    expect(response?.status()).toBe(200);
    await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toMatch(/damper/i);
    await expect(
      page.getByText("Twistlog is the team workspace for driveline NVH").count(),
    ).resolves.toBe(1);

    const heading = page.getByRole("heading", { level: 1 });
    const style = await heading.evaluate((el) => {
      const s = getComputedStyle(el);
      return { family: s.fontFamily, size: s.fontSize, weight: s.fontWeight };
    });
    // Tailwind's text-3xl is 1.875rem = 30px and font-semibold is 600 (Tailwind CSS 4 defaults).
    expect(style.family.split(",")[0]?.replace(/"/g, "").trim()).toBe("Inter");
    expect(style.size).toBe("30px");
    expect(style.weight).toBe("600");

    // The font really loaded (not just named in CSS), from our own origin.
    await page.evaluate(() => document.fonts.ready);
    const loaded = await page.evaluate(() =>
      [...document.fonts]
        .filter((f) => f.status === "loaded")
        .map((f) => `${f.family} ${f.weight}`),
    );
    expect(loaded.some((f) => /Inter/.test(f) && /600/.test(f))).toBe(true);
    const fontRequests = requested.filter((u) => /\.woff2?(\?|$)/.test(u));
    expect(fontRequests.length).toBeGreaterThan(0);

    const origin = new URL(baseUrl).origin;
    expect(requested.filter((u) => !u.startsWith(origin) && !u.startsWith("data:"))).toEqual([]);
    expect(consoleErrors).toEqual([]);
    await page.close();
  });

  it("has the product name in the header and the main areas in the navigation", async () => {
    const page = await browser.newPage();
    await page.goto(baseUrl);
    const nav = page.getByRole("navigation", { name: "Main" });
    await expect(nav.getByRole("link").allTextContents()).resolves.toEqual([
      "Vehicles",
      "Comparisons",
      "Team",
    ]);
    // Vehicles needs a sign-in, and comes back to Vehicles after it.
    await nav.getByRole("link", { name: "Vehicles" }).click();
    await page.waitForURL(`${baseUrl}/sign-in?redirectTo=%2Fvehicles`);
    await page.getByLabel("E-mail address").fill("viewer@twistlog.test");
    await page.getByLabel("Password").fill("twistlog-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(`${baseUrl}/vehicles`);
    // The URL changes as the client navigation commits; the page renders a moment later.
    await page.getByRole("heading", { level: 1, name: "Vehicles" }).waitFor();
    await page.close();
  });
});

describe("listening sockets", () => {
  // /proc/net/tcp{,6} list every socket; state 0A is LISTEN. Addresses are hex, little-endian.
  function listeners(port: number): string[] {
    const found: string[] = [];
    for (const file of ["/proc/net/tcp", "/proc/net/tcp6"]) {
      for (const line of readFileSync(file, "utf8").split("\n").slice(1)) {
        const cols = line.trim().split(/\s+/);
        const local = cols[1];
        if (!local || cols[3] !== "0A") continue;
        const [addr, portHex] = local.split(":");
        if (parseInt(portHex ?? "", 16) === port) found.push(addr ?? "");
      }
    }
    return found;
  }

  it("the app server, the database and the fake mail server listen on loopback only", () => {
    const appPort = Number(new URL(baseUrl).port);
    const dbPort = Number(process.env.DATABASE_PORT ?? 3408);
    const smtpPort = Number(process.env.FAKE_SMTP_PORT ?? 2526);
    for (const port of [appPort, dbPort, smtpPort]) {
      const addrs = listeners(port);
      expect(addrs.length, `something listens on ${port}`).toBeGreaterThan(0);
      // 0100007F is 127.0.0.1 in /proc's byte order.
      expect(addrs.every((a) => a === "0100007F")).toBe(true);
    }
  });
});
