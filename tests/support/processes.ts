import { spawn } from "node:child_process";
import { mkdtempSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";

export const repoRoot = fileURLToPath(new URL("../..", import.meta.url));
// `node --import tsx` rather than the tsx wrapper: the child is then the program itself, so a
// kill on a timeout stops it, instead of leaving the real process running behind a dead wrapper.
const node = process.execPath;
const tsxArgs = ["--import", "tsx"];

/** A TCP port on 127.0.0.1 that nothing listens on right now. */
export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once("error", reject);
    probe.listen(0, "127.0.0.1", () => {
      const address = probe.address();
      probe.close(() =>
        typeof address === "object" && address
          ? resolve(address.port)
          : reject(new Error("no port")),
      );
    });
  });
}

export interface Finished {
  code: number | null;
  stdout: string;
  stderr: string;
}

/** Runs a TypeScript entry (script or server) with tsx and extra environment; resolves when it exits. */
export function runTs(
  entry: string,
  env: Record<string, string>,
  timeoutMs = 20_000,
): Promise<Finished> {
  return new Promise((resolve, reject) => {
    const child = spawn(node, [...tsxArgs, entry], {
      cwd: repoRoot,
      env: { ...process.env, ...env },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d) => (stdout += d));
    child.stderr.on("data", (d) => (stderr += d));
    const timer = setTimeout(() => child.kill("SIGKILL"), timeoutMs);
    child.on("error", reject);
    child.on("close", (code) => {
      clearTimeout(timer);
      resolve({ code, stdout, stderr });
    });
  });
}

/**
 * Settings for a server started by a test: its own fake SMTP port and mail folder, so it never
 * meets the test server's (scripts/test.sh) or another test's.
 */
export async function ownMail(): Promise<{ FAKE_SMTP_PORT: string; MAIL_DIR: string }> {
  return {
    FAKE_SMTP_PORT: String(await freePort()),
    MAIL_DIR: mkdtempSync(join(tmpdir(), "twistlog-mail-")),
  };
}

/**
 * Starts the production server (build/ must exist) and resolves once it prints that it is serving.
 * `nodeArgs` go before the entry (e.g. another `--import`).
 */
export async function startServer(
  env: Record<string, string>,
  options: { nodeArgs?: string[] } = {},
): Promise<{
  url: string;
  mailDir: string;
  /** The server process's id (e.g. to read its memory from /proc). */
  pid: number;
  /** Everything it wrote to stdout and stderr so far. */
  output: () => string;
  stop: () => Promise<void>;
}> {
  const port = await freePort();
  const mail = await ownMail();
  const child = spawn(node, [...tsxArgs, ...(options.nodeArgs ?? []), "server/index.ts"], {
    cwd: repoRoot,
    env: {
      ...process.env,
      NODE_ENV: "production",
      PORT: String(port),
      // Tests tell the server their (made-up) client address in X-Forwarded-For.
      TRUST_PROXY: "loopback",
      ...mail,
      ...env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let output = "";
  await new Promise<void>((resolve, reject) => {
    // A server that never said it serves is stopped, not left behind for the rest of the run.
    const timer = setTimeout(() => {
      child.kill("SIGKILL");
      reject(new Error(`server did not start: ${output}`));
    }, 20_000);
    const onData = (d: Buffer) => {
      output += d;
      if (output.includes("is serving on")) {
        clearTimeout(timer);
        resolve();
      }
    };
    child.stdout.on("data", onData);
    child.stderr.on("data", onData);
    child.on("exit", (code) => reject(new Error(`server exited with ${code}: ${output}`)));
  });
  return {
    url: `http://127.0.0.1:${port}`,
    mailDir: env.MAIL_DIR ?? mail.MAIL_DIR,
    pid: child.pid!,
    output: () => output,
    stop: () =>
      new Promise((resolve) => {
        child.once("exit", () => resolve());
        child.kill("SIGTERM");
      }),
  };
}
