import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startServer } from "../support/processes";
import { useJobTestbed } from "../support/scratch-db";

// The last-resort handlers of server/index.ts (uncaughtException, unhandledRejection) against
// the production server: an error that escapes is logged in one line and the server keeps
// serving. No request is known to let an error escape any more, so a preload
// (tests/support/escape-after-listen.ts, loaded with --import by this test only) lets three
// escape right after the server listens; the handlers themselves are the real ones.
const testbed = await useJobTestbed("lastresort");
const { pool } = await import("~/lib/infra/db.server");

let server: Awaited<ReturnType<typeof startServer>>;

beforeAll(async () => {
  const preload = fileURLToPath(new URL("../support/escape-after-listen.ts", import.meta.url));
  server = await startServer(testbed.serverEnv, { nodeArgs: ["--import", preload] });
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
  await testbed.close();
});

describe("the last-resort handler", () => {
  it("logs each escaped error in one line and keeps serving", { timeout: 60_000 }, async () => {
    const lines = () =>
      server
        .output()
        .split("\n")
        .filter((l) => l.includes("(kept serving)"));
    for (let i = 0; i < 100 && lines().length < 3; i++) {
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(lines().sort()).toEqual([
      "Uncaught exception (kept serving): Error ECONNRESET: test: the client went away",
      "Uncaught exception (kept serving): TypeError: test: thrown from a timer",
      "Unhandled rejection (kept serving): Error: test: a promise nobody awaits",
    ]);
    // No stack trace: the handler writes the name and message only.
    expect(server.output()).not.toMatch(/^\s+at /m);
    const health = await fetch(`${server.url}/healthz`);
    expect(health.status).toBe(200);
    expect(await health.json()).toEqual({ ok: true, db: "up" });
    const page = await fetch(`${server.url}/sign-in`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain("<form");
  });
});
