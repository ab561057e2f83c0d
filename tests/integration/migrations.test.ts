import mysql from "mysql2/promise";
import { randomBytes } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";
import { applyMigrations, MigrationError } from "~/lib/infra/db/migrate.server";
import { connectionOptions } from "~/lib/infra/db-options.server";
import { getEnv } from "~/lib/infra/env.server";

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
    // Sorted here: MariaDB's collation puts "_" after letters.
    const tables = (await tablesOf(database)).sort();
    expect(tables).toEqual([
      "__drizzle_migrations",
      "analyses",
      "analysis_jobs",
      "analysis_segments",
      "api_tokens",
      "audit_events",
      "comments",
      "drive_logs",
      "invitations",
      "isolation_points",
      "memberships",
      "order_curve_points",
      "password_resets",
      "sessions",
      "share_views",
      "shares",
      "sign_in_failures",
      "signoff_results",
      "signoff_steps",
      "signoffs",
      "targets",
      "teams",
      "users",
      "vehicles",
    ]);

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

  it("give every table a primary key, and use only InnoDB (what a Galera cluster replicates)", async () => {
    // MariaDB Knowledge Base, "MariaDB Galera Cluster - Known Limitations": replication works
    // only with InnoDB; all tables should have a primary key (DELETE is unsupported without
    // one, and rows may appear in a different order on different nodes). Issue 18 runs this
    // schema on such a cluster.
    const database = await scratchDatabase();
    await applyMigrations({ ...base, database });
    const [rows] = await admin.query<mysql.RowDataPacket[]>(
      `SELECT t.table_name AS name, t.engine AS engine, c.constraint_name AS pk
         FROM information_schema.tables t
         LEFT JOIN information_schema.table_constraints c
           ON c.table_schema = t.table_schema AND c.table_name = t.table_name
          AND c.constraint_type = 'PRIMARY KEY'
        WHERE t.table_schema = ?`,
      [database],
    );
    expect(rows.length).toBeGreaterThan(20);
    expect(rows.filter((r) => r.pk === null).map((r) => r.name)).toEqual([]);
    expect(rows.filter((r) => r.engine !== "InnoDB").map((r) => r.name)).toEqual([]);
  });

  it("keep the constraints the schema declares (unique e-mail, foreign keys, one membership per team)", async () => {
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
      await c.query("INSERT INTO teams (name, slug) VALUES ('T', 't')");
      await c.query(
        "INSERT INTO memberships (team_id, user_id, role) SELECT t.id, u.id, 'viewer' FROM teams t, users u",
      );
      await expect(
        c.query(
          "INSERT INTO memberships (team_id, user_id, role) SELECT t.id, u.id, 'admin' FROM teams t, users u",
        ),
      ).rejects.toMatchObject({ code: "ER_DUP_ENTRY" });
      await expect(
        c.query(
          "INSERT INTO memberships (team_id, user_id, role) SELECT t.id, u.id, 'owner' FROM teams t, users u",
        ),
      ).rejects.toMatchObject({ code: "WARN_DATA_TRUNCATED" });
    } finally {
      await c.end();
    }
  });

  it("report MariaDB's own error text and the failing statement when a migration fails", async () => {
    const database = await scratchDatabase();
    // A table left behind by hand makes the first CREATE TABLE fail (DDL is not transactional).
    await admin.query(`CREATE TABLE \`${database}\`.api_tokens (id INT)`);
    const failure = applyMigrations({ ...base, database });
    await expect(failure).rejects.toBeInstanceOf(MigrationError);
    await expect(failure).rejects.toThrow(
      /ER_TABLE_EXISTS_ERROR: Table 'api_tokens' already exists in: CREATE TABLE `api_tokens`/,
    );
  });
});
