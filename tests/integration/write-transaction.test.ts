import { afterAll, describe, expect, it } from "vitest";
import { useScratchDatabase } from "../support/scratch-db";

// writeTransaction (db-errors.server.ts) against a real deadlock on MariaDB: two transactions
// lock two rows in opposite order. InnoDB picks one as the victim and rolls it back with error
// 1213 (MariaDB's error reference: "Deadlock found when trying to get lock; try restarting
// transaction"); writeTransaction runs it again, and both commit. A Galera cluster reports a
// transaction that loses certification with the same error, so every write transaction of the
// app goes through it (issue 18). A database of this file's own (tests/support/scratch-db.ts).
const scratch = await useScratchDatabase("deadlock");
const { db, pool } = await import("~/lib/infra/db.server");
const { teams } = await import("~/lib/infra/db/schema");
const { eq, inArray } = await import("drizzle-orm");
const { writeTransaction } = await import("~/lib/infra/db-errors.server");

afterAll(async () => {
  await pool.end();
  await scratch.drop();
});

describe("writeTransaction", () => {
  it("runs a deadlock victim again, so both of two crossing transactions commit", async () => {
    await db.insert(teams).values([
      { name: "Kestrel A", slug: "kestrel-a" },
      { name: "Kestrel B", slug: "kestrel-b" },
    ]);
    const rows = await db.select({ id: teams.id, slug: teams.slug }).from(teams);
    const a = rows.find((r) => r.slug === "kestrel-a")!.id;
    const b = rows.find((r) => r.slug === "kestrel-b")!.id;

    // Both first attempts take their first lock, then meet here before reaching for the other.
    let arrived = 0;
    let release!: () => void;
    const bothLocked = new Promise<void>((resolve) => (release = resolve));
    const meet = async () => {
      if (++arrived === 2) release();
      await bothLocked;
    };
    const attempts = { one: 0, two: 0 };
    const crossing = (first: number, second: number, who: "one" | "two") =>
      writeTransaction(db, async (tx) => {
        attempts[who]++;
        await tx
          .update(teams)
          .set({ name: `${who} first` })
          .where(eq(teams.id, first));
        if (attempts[who] === 1) await meet();
        await tx
          .update(teams)
          .set({ name: `${who} second` })
          .where(eq(teams.id, second));
        return who;
      });

    const done = await Promise.all([crossing(a, b, "one"), crossing(b, a, "two")]);
    expect(done).toEqual(["one", "two"]);
    // One of them was the victim and ran twice; the other ran once.
    expect(attempts.one + attempts.two).toBe(3);
    const victim = attempts.one === 2 ? "one" : "two";
    // The victim committed last: both rows carry its names.
    const after = await db
      .select({ id: teams.id, name: teams.name })
      .from(teams)
      .where(inArray(teams.id, [a, b]));
    expect(after.map((r) => r.name).sort()).toEqual([`${victim} first`, `${victim} second`]);
  });
});
