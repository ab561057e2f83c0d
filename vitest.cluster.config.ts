import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";
import { clusterEnv } from "./tests/cluster/ports";

// npm run test:cluster: the scale-out tests (issue 18) against a whole cluster that
// tests/cluster/global-setup.ts starts with scripts/cluster.sh — 3 Galera nodes, the S3
// stand-in, two app instances and HAProxy — on TEST_CLUSTER_PORT (default 3900) and up.
// The test process reaches the same database (through HAProxy) and bucket as the instances.
export default defineConfig({
  resolve: {
    alias: { "~": fileURLToPath(new URL("./app", import.meta.url)) },
  },
  test: {
    include: ["tests/cluster/**/*.test.ts"],
    environment: "node",
    globalSetup: ["tests/cluster/global-setup.ts"],
    env: clusterEnv(),
    testTimeout: 600_000,
    hookTimeout: 600_000,
    fileParallelism: false,
  },
});
