import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { repoRoot } from "../support/processes";

// The repository stands alone: a clone has nothing beside it, so every document that the code
// or the docs cite must be one of its own files.
const tracked = execFileSync("git", ["ls-files"], { cwd: repoRoot, encoding: "utf8" })
  .split("\n")
  .filter((path) => path && !path.endsWith("package-lock.json") && !/\.(csv|mf4|png)$/.test(path));

const read = (path: string) => readFileSync(join(repoRoot, path), "utf8");

describe("the repository stands alone", () => {
  it("no file points into a folder beside the checkout", () => {
    const outside = tracked.filter((path) => /\.\.\/shared\b/.test(read(path)));
    expect(outside).toEqual([]);
  });

  it("every Markdown document that a file names is in the repository", () => {
    const missing: string[] = [];
    for (const path of tracked) {
      for (const match of read(path).matchAll(/(?<![\w-])((?:[\w.-]+\/)*[\w-]+\.md)\b/g)) {
        const named = (match[1] ?? "").replace(/^(\.\.?\/)+/, "");
        if (!tracked.some((file) => file === named || file.endsWith(`/${named}`)))
          missing.push(`${path}: ${match[1]}`);
      }
    }
    expect(missing).toEqual([]);
  });
});
