/**
 * The `analyse` command as a user runs it, for the CLI tests: a separate node process with the
 * tsx loader, in the repository's root, and a temporary folder for the files it reads (removed
 * after the test file).
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll } from "vitest";

const CLI = fileURLToPath(new URL("../../app/lib/signal/cli.ts", import.meta.url));
const ROOT = fileURLToPath(new URL("../..", import.meta.url));

/** Runs the CLI with `args`; its exit code and both outputs. */
export function runCli(...args: string[]) {
  const r = spawnSync(process.execPath, ["--import", "tsx", CLI, ...args], {
    cwd: ROOT,
    encoding: "utf8",
    timeout: 60_000,
  });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** A temporary folder named after `prefix`, removed once the test file has run. */
export function cliTempDir(prefix: string): string {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  return dir;
}
