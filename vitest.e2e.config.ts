import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// Browser tests: real Chromium (Debian's /usr/bin/chromium via playwright-core) against the
// production build that scripts/test.sh serves at TWISTLOG_BASE_URL.
export default defineConfig({
  resolve: {
    alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) },
  },
  test: {
    include: ["tests/e2e/**/*.test.ts"],
    setupFiles: ["tests/e2e/failure-report.ts"],
    environment: "node",
    testTimeout: 60_000,
    hookTimeout: 60_000,
    fileParallelism: false,
    // A failed browser test runs once more, as Playwright's own runner is commonly set up for CI:
    // a timing flake on a busy machine then does not fail the run, while a real fault fails both
    // attempts. Every failed attempt is printed with what its pages showed (failure-report.ts).
    retry: 1,
  },
});
