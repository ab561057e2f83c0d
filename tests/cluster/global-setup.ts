/**
 * Starts the whole cluster once for tests/cluster (scripts/cluster.sh, as `npm run cluster`
 * does, without the demo team) and stops it afterwards. Its output goes to
 * <clusterDir>/cluster.log; each part's own log sits beside it.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { createWriteStream, mkdirSync, readFileSync, rmSync } from "node:fs";
import { repoRoot } from "../support/processes";
import { clusterBase, clusterDir, clusterEnv } from "./ports";

let cluster: ChildProcess | undefined;

export async function setup() {
  rmSync(clusterDir, { recursive: true, force: true });
  mkdirSync(clusterDir, { recursive: true });
  const logPath = `${clusterDir}/cluster.log`;
  const log = createWriteStream(logPath);
  const child = spawn("bash", ["scripts/cluster.sh", "start"], {
    cwd: repoRoot,
    env: { ...outsideVitest(), ...clusterEnv(), ...scriptEnv() },
    stdio: ["ignore", "pipe", "pipe"],
  });
  cluster = child;
  let output = "";
  const ready = new Promise<void>((resolve, reject) => {
    const onData = (d: Buffer) => {
      log.write(d);
      output += d.toString();
      if (output.includes("Ctrl-C stops the whole cluster")) resolve();
    };
    child.stdout!.on("data", onData);
    child.stderr!.on("data", onData);
    child.once("exit", (code) =>
      reject(
        new Error(
          `scripts/cluster.sh exited (${code}) before the cluster was up:\n${output.slice(-3000)}`,
        ),
      ),
    );
  });
  await ready;
  process.stderr.write(`cluster up (log: ${logPath})\n${statusLines(output)}\n`);
}

export async function teardown() {
  if (!cluster || cluster.exitCode !== null) return;
  const exited = new Promise((resolve) => cluster!.once("exit", resolve));
  cluster.kill("SIGTERM");
  await exited;
  if (!process.env.KEEP_CLUSTER_DIR) rmSync(clusterDir, { recursive: true, force: true });
}

/**
 * This process's environment without vitest's own variables: with VITEST set, vite.config.ts
 * leaves the React Router plugin out, and the cluster script's build would fail.
 */
function outsideVitest(): NodeJS.ProcessEnv {
  return Object.fromEntries(Object.entries(process.env).filter(([k]) => !k.startsWith("VITEST")));
}

/** What scripts/cluster.sh reads beyond the database and bucket settings. */
export function scriptEnv(): Record<string, string> {
  return {
    CLUSTER_PORT: String(clusterBase),
    CLUSTER_DIR: clusterDir,
    CLUSTER_APPS: "2",
    CLUSTER_SEED: "0",
  };
}

function statusLines(output: string): string {
  return output
    .split("\n")
    .filter((l) => /^(galera|bucket|app\d|haproxy)/.test(l))
    .join("\n");
}

export function clusterLog(): string {
  return readFileSync(`${clusterDir}/cluster.log`, "utf8");
}
