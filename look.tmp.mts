import { chromium } from "playwright-core";
const base = "http://127.0.0.1:3300";
const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", args: ["--no-sandbox", "--disable-gpu"] });
const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
async function signIn(email: string) {
  await page.goto(`${base}/sign-in`);
  await page.getByLabel(/E-mail/i).fill(email);
  await page.getByLabel(/Password/i).fill("twistlog-demo");
  await page.getByRole("button", { name: /Sign in/i }).click();
  await page.waitForURL(/vehicles/);
}
await signIn("admin@twistlog.test");
for (let i = 0; i < 60; i++) {
  const r = await page.request.get(`${base}/api/v1/signoffs?vehicleId=1`);
  const j = await r.json();
  if (j.signoffs?.length >= 2) { console.log(j.signoffs.map((s: any) => `${s.id} ${s.damperVariant} ${s.state}`)); break; }
  await new Promise((r) => setTimeout(r, 3000));
}
await page.goto(`${base}/vehicles/1`);
const card = page.locator("#signoff, section:has-text('Sign-off')").first();
await page.screenshot({ path: "/tmp/shots/vehicle.png", fullPage: true });
const list = await (await page.request.get(`${base}/api/v1/signoffs?vehicleId=1`)).json();
for (const s of list.signoffs) {
  await page.goto(`${base}/vehicles/1/signoffs/${s.id}`);
  await page.screenshot({ path: `/tmp/shots/signoff-${s.id}-${s.state}.png`, fullPage: true });
}
await page.goto(`${base}/vehicles/1/signoffs/new?damperVariant=A`);
await page.screenshot({ path: "/tmp/shots/propose.png", fullPage: true });
const pdf = await page.request.get(`${base}/api/v1/signoffs/${list.signoffs.find((s: any) => s.state === "approved").id}/report.pdf`);
const fs = await import("node:fs");
fs.writeFileSync("/tmp/shots/approved.pdf", await pdf.body());
await browser.close();
