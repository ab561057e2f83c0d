import mysql from "mysql2/promise";
import { randomBytes } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";
import { applyMigrations, MigrationError } from "~/db/migrate.server";
import { connectionOptions } from "~/lib/db-options.server";
import { getEnv } from "~/lib/env.server";

// Against the real MariaDB that scripts/test.sh starts. Each test makes its own scratch
// database (the app user may create databases named after DATABASE_NAME).
const env = getEnv();
const base = connectionOptions(env);
const admin = await mysql.createConnection({ ...base, database: undefined });
const created: string[] = [];

async function scratchDatabase(): Promise<string> {
  const name = `${env.DATABASE_NAME}_m${randomBytes(4).toString("hex")}`;
  await admin.query(`CREATE DATABASE \`${name}\``);
  created.push(name);
  return name;
}

async function tablesOf(database: string): Promise<string[]> {
  const [rows] = await admin.query<mysql.RowDataPacket[]>(
    "SELECT table_name AS name FROM information_schema.tables WHERE table_schema = ? ORDER BY table_name",
    [database],
  );
  return rows.map((r) => String(r.name));
}

afterAll(async () => {
  for (const name of created) await admin.query(`DROP DATABASE IF EXISTS \`${name}\``);
  await admin.end();
});

describe("migrations against MariaDB", () => {
  it("bring a fresh database to the schema, and a second run changes nothing", async () => {
    const database = await scratchDatabase();
    expect(await tablesOf(database)).toEqual([]);

    await applyMigrations({ ...base, database });
    const tables = await tablesOf(database);
    for (const expected of ["__drizzle_migrations", "sessions", "teams", "users"]) {
      expect(tables).toContain(expected);
    }

    const [before] = await admin.query<mysql.RowDataPacket[]>(
      `SELECT COUNT(*) AS n FROM \`${database}\`.__drizzle_migrations`,
    );
    await applyMigrations({ ...base, database });
    const [after] = await admin.query<mysql.RowDataPacket[]>(
      `SELECT COUNT(*) AS n FROM \`${database}\`.__drizzle_migrations`,
    );
    expect(after[0]?.n).toBe(before[0]?.n);
    expect(Number(before[0]?.n)).toBeGreaterThan(0);
  });

  it("keep the constraints the schema declares (unique e-mail, session → user foreign key)", async () => {
    const database = await scratchDatabase();
    await applyMigrations({ ...base, database });
    const c = await mysql.createConnection({ ...base, database });
    try {
      await c.query("INSERT INTO users (email, name) VALUES ('a@example.test', 'A')");
      await expect(
        c.query("INSERT INTO users (email, name) VALUES ('a@example.test', 'B')"),
      ).rejects.toMatchObject({
        code: "ER_DUP_ENTRY",
      });
      await expect(
        c.query("INSERT INTO sessions (id, user_id, expires_at) VALUES ('s1', 999999, NOW())"),
      ).rejects.toMatchObject({ code: "ER_NO_REFERENCED_ROW_2" });
    } finally {
      await c.end();
    }
  });

  it("report MariaDB's own error text and the failing statement when a migration fails", async () => {
    const database = await scratchDatabase();
    // A table left behind by hand makes the first CREATE TABLE fail (DDL is not transactional).
    await admin.query(`CREATE TABLE \`${database}\`.sessions (id INT)`);
    const failure = applyMigrations({ ...base, database });
    await expect(failure).rejects.toBeInstanceOf(MigrationError);
    await expect(failure).rejects.toThrow(
      /ER_TABLE_EXISTS_ERROR: Table 'sessions' already exists in: CREATE TABLE `sessions`/,
    );
  });
});
