/**
 * What the benches that need the real server share: a MariaDB of their own in a temporary
 * folder (scripts/mariadb.sh, port BENCH_DATABASE_PORT + offset, default 3468 + offset), the
 * production build (built first when build/ is missing) and the server started with
 * `node --import tsx server/index.ts` (not the tsx wrapper, so its pid is the server's own).
 */
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { freePort } from "../tests/support/processes.ts";

export const root = fileURLToPath(new URL("..", import.meta.url));

export interface BenchSetup {
  dir: string;
  env: NodeJS.ProcessEnv;
  /** Runs a command in the repository with the bench's settings; its output is dropped. */
  run: (cmd: string, args: string[]) => void;
}

/**
 * A temporary folder and the settings for it. They are put into process.env too, so app
 * modules imported afterwards (db.server.ts …) connect to the bench database.
 */
export function benchSetup(
  name: string,
  portOffset: number,
  extra: NodeJS.ProcessEnv = {},
): BenchSetup {
  const dir = mkdtempSync(join(tmpdir(), `twistlog-${name}-bench-`));
  const env = {
    ...process.env,
    TWISTLOG_DB_DIR: join(dir, "mariadb"),
    DATABASE_PORT: String(Number(process.env.BENCH_DATABASE_PORT ?? "3468") + portOffset),
    DATABASE_NAME: "twistlog_bench",
    TWISTLOG_STORAGE_DIR: join(dir, "blobs"),
    MAIL_DIR: join(dir, "mail"),
    NODE_ENV: "production",
    ...extra,
  };
  Object.assign(process.env, env);
  const run = (cmd: string, args: string[]) => {
    execFileSync(cmd, args, { cwd: root, env, stdio: ["ignore", "ignore", "inherit"] });
  };
  return { dir, env, run };
}

/** Starts the bench's MariaDB, migrates it (seeds the demo data when asked), builds if needed. */
export function prepareDatabaseAndBuild({ run }: BenchSetup, { seed = false } = {}) {
  run("bash", ["scripts/mariadb.sh", "start"]);
  run(process.execPath, ["--import", "tsx", "scripts/migrate.ts"]);
  if (seed) run(process.execPath, ["--import", "tsx", "scripts/seed.ts"]);
  if (!existsSync(join(root, "build/server/index.js"))) run("npm", ["run", "-s", "build"]);
}

export interface BenchServer {
  process: ChildProcess;
  pid: number;
  base: string;
  /** The exit code or signal once the server has ended; undefined while it runs. */
  exited: () => string | undefined;
}

/**
 * Starts the production server on free ports and resolves once it is serving. `nodeArgs` go
 * before the script (e.g. --cpu-prof to see where a bench's time goes).
 */
export async function startBenchServer(
  { env }: BenchSetup,
  nodeArgs: string[] = [],
): Promise<BenchServer> {
  const port = await freePort();
  const smtp = await freePort();
  const child = spawn(process.execPath, [...nodeArgs, "--import", "tsx", "server/index.ts"], {
    cwd: root,
    env: { ...env, PORT: String(port), FAKE_SMTP_PORT: String(smtp) },
    stdio: ["ignore", "pipe", "inherit"],
  });
  let ended: string | undefined;
  child.on("exit", (code, signal) => (ended = signal ?? `code ${code}`));
  await new Promise<void>((resolve, reject) => {
    child.stdout!.on("data", (d: Buffer) => d.toString().includes("is serving on") && resolve());
    child.on("exit", (code) => reject(new Error(`server exited with ${code}`)));
  });
  return { process: child, pid: child.pid!, base: `http://127.0.0.1:${port}`, exited: () => ended };
}

/** Stops the server and the database and removes the temporary folder. */
export async function cleanUp({ dir, run }: BenchSetup, server?: BenchServer) {
  // The server finishes what it still works on (at most 5 s, server/index.ts) before the
  // database goes away, so its log shows no database errors that only the shutdown caused.
  if (server && !server.exited()) {
    const ended = new Promise((r) => server.process.once("exit", r));
    server.process.kill("SIGTERM");
    await Promise.race([ended, new Promise((r) => setTimeout(r, 7_000))]);
  }
  try {
    run("bash", ["scripts/mariadb.sh", "stop"]);
  } catch {
    // already stopped
  }
  rmSync(dir, { recursive: true, force: true });
}

/** Resident and peak resident memory of a process in MB (Linux /proc, VmRSS and VmHWM). */
export function memoryOf(pid: number): { rssMB: number; peakMB: number } {
  const status = readFileSync(`/proc/${pid}/status`, "utf8");
  const kB = (key: string) => Number(new RegExp(`${key}:\\s+(\\d+)`).exec(status)?.[1] ?? NaN);
  return { rssMB: kB("VmRSS") / 1024, peakMB: kB("VmHWM") / 1024 };
}

/**
 * A team and an API token of its technician in the bench database. Call after
 * prepareDatabaseAndBuild: the app modules read the bench settings when first imported.
 */
export async function benchTeam(label: string) {
  const { apiTokenOf, createTestTeam } = await import("../tests/support/accounts.ts");
  const team = await createTestTeam(label);
  const token = await apiTokenOf(team, "technician", `${label.toLowerCase()} bench`);
  return { team, token };
}
