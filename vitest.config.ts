import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// Unit and integration tests. Integration tests read the database settings that
// scripts/test.sh exports (a throwaway MariaDB on its own port).
export default defineConfig({
  resolve: {
    alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) },
  },
  test: {
    include: ["app/**/*.test.ts", "tests/unit/**/*.test.ts", "tests/integration/**/*.test.ts"],
    environment: "node",
    setupFiles: ["tests/setup/fail-on-console.ts"],
    testTimeout: 30_000,
    hookTimeout: 60_000,
    fileParallelism: true,
  },
});
