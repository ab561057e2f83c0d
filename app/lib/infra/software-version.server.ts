import { existsSync, readFileSync, statSync } from "node:fs";
import { join } from "node:path";

/**
 * The software that made a result, report or export, as records name it: "twistlog 0.1.0" and,
 * when known, the commit ("twistlog 0.1.0+5bde370"). The commit comes from TWISTLOG_COMMIT, else
 * from the checkout's .git (read once, without running git); an installation without either
 * names the version alone.
 */
let cached: string | undefined;

export function softwareVersion(): string {
  if (cached !== undefined) return cached;
  const root = process.cwd();
  let version = "0.0.0";
  try {
    version = (JSON.parse(readFileSync(join(root, "package.json"), "utf8")) as { version: string })
      .version;
  } catch {
    // Not started from the project folder: the version stays unknown.
  }
  const commit = process.env.TWISTLOG_COMMIT?.trim() || gitCommit(root);
  cached = `twistlog ${version}${commit ? `+${commit.slice(0, 12)}` : ""}`;
  return cached;
}

function gitCommit(root: string): string | null {
  try {
    let git = join(root, ".git");
    if (!existsSync(git)) return null;
    // A worktree's .git is a file naming the real folder ("gitdir: …").
    if (statSync(git).isFile()) {
      const named = /^gitdir:\s*(.+)$/m.exec(readFileSync(git, "utf8"));
      if (!named) return null;
      git = named[1]!.trim();
      const common = join(git, "commondir");
      const head = readFileSync(join(git, "HEAD"), "utf8").trim();
      if (!head.startsWith("ref: ")) return /^[0-9a-f]{40}$/.test(head) ? head : null;
      if (existsSync(common)) git = join(git, readFileSync(common, "utf8").trim());
      return refCommit(git, head.slice(5));
    }
    const head = readFileSync(join(git, "HEAD"), "utf8").trim();
    if (!head.startsWith("ref: ")) return /^[0-9a-f]{40}$/.test(head) ? head : null;
    return refCommit(git, head.slice(5));
  } catch {
    return null;
  }
}

/** The commit a branch points at: its loose ref file, else the packed refs. */
function refCommit(git: string, ref: string): string | null {
  const loose = join(git, ref);
  if (existsSync(loose)) return readFileSync(loose, "utf8").trim();
  const packed = join(git, "packed-refs");
  if (!existsSync(packed)) return null;
  const line = readFileSync(packed, "utf8")
    .split("\n")
    .find((l) => l.endsWith(` ${ref}`));
  return line ? line.split(" ")[0]! : null;
}
