import { readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { isDeadlock, retryOnDeadlock } from "~/lib/infra/db-errors.server";
import { repoRoot } from "../support/processes";

// The error as mysql2 reports a deadlock victim (errno 1213, code ER_LOCK_DEADLOCK: MariaDB's
// error reference), wrapped the way Drizzle wraps it (DrizzleQueryError, the original in `cause`).
function deadlock(): Error {
  const original = Object.assign(new Error("Deadlock found when trying to get lock"), {
    code: "ER_LOCK_DEADLOCK",
    errno: 1213,
  });
  return new Error("Failed query: insert into `invitations` …", { cause: original });
}

describe("retrying a deadlock victim", () => {
  it("recognises error 1213 through Drizzle's wrapper, and nothing else", () => {
    expect(isDeadlock(deadlock())).toBe(true);
    const duplicate = Object.assign(new Error("Duplicate entry"), {
      code: "ER_DUP_ENTRY",
      errno: 1062,
    });
    expect(isDeadlock(new Error("Failed query", { cause: duplicate }))).toBe(false);
    expect(isDeadlock(undefined)).toBe(false);
  });

  it("runs the transaction again after a deadlock and returns its result", async () => {
    let runs = 0;
    const result = await retryOnDeadlock(async () => {
      runs++;
      if (runs === 1) throw deadlock();
      return "committed";
    });
    expect(result).toBe("committed");
    expect(runs).toBe(2);
  });

  it("gives up after the attempts, and never retries another error", async () => {
    let runs = 0;
    await expect(
      retryOnDeadlock(async () => {
        runs++;
        throw deadlock();
      }, 3),
    ).rejects.toThrow(/Failed query/);
    expect(runs).toBe(3);

    runs = 0;
    await expect(
      retryOnDeadlock(async () => {
        runs++;
        throw new Error("constraint");
      }),
    ).rejects.toThrow("constraint");
    expect(runs).toBe(1);
  });

  it("is how every write transaction of the app runs (no bare db.transaction outside it)", () => {
    // docs/decisions/009: on a Galera cluster any transaction can fail certification with 1213.
    const files = readdirSync(join(repoRoot, "app"), { recursive: true, encoding: "utf8" })
      .filter((f) => f.endsWith(".ts") && !f.includes(".test."))
      .map((f) => join("app", f));
    expect(files.length).toBeGreaterThan(100);
    const bare = files.flatMap((f) =>
      readFileSync(join(repoRoot, f), "utf8")
        .split("\n")
        .flatMap((line, i) =>
          /\bdb\.transaction\(/.test(line) && !line.trimStart().startsWith("*")
            ? [`${f}:${i + 1}`]
            : [],
        ),
    );
    // The one allowed: writeTransaction itself.
    expect(bare.filter((at) => !at.startsWith("app/lib/infra/db-errors.server.ts:"))).toEqual([]);
    expect(bare).toHaveLength(1);
  });
});
