import mysql from "mysql2/promise";
import { randomBytes } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { applyMigrations } from "~/lib/infra/db/migrate.server";
import { connectionOptions } from "~/lib/infra/db-options.server";
import { getEnv } from "~/lib/infra/env.server";

/**
 * A database of this test file's own, with every migration applied. Tests that run job runners
 * need one: any server or runner on the shared test database would claim their jobs. Call it
 * before anything imports ~/lib/db.server (import such modules dynamically afterwards); the
 * servers the file starts get `DATABASE_NAME` passed on.
 */
export async function useScratchDatabase(label: string) {
  // Not the cached settings: the app's modules must read the new DATABASE_NAME afterwards.
  const env = getEnv({ ...process.env });
  const name = `${env.DATABASE_NAME}_${label}_${randomBytes(3).toString("hex")}`;
  const base = connectionOptions(env);
  const admin = await mysql.createConnection({ ...base, database: undefined });
  // The character set scripts/mariadb.sh gives the real database: the server's own default
  // (latin1 under --no-defaults) cannot store text such as U+FFFD from a file that is not UTF-8.
  await admin.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await admin.end();
  await applyMigrations({ ...base, database: name });
  const previous = process.env.DATABASE_NAME;
  process.env.DATABASE_NAME = name;
  return {
    name,
    async drop() {
      const c = await mysql.createConnection({ ...base, database: undefined });
      await c.query(`DROP DATABASE IF EXISTS \`${name}\``);
      await c.end();
      if (previous === undefined) delete process.env.DATABASE_NAME;
      else process.env.DATABASE_NAME = previous;
    },
  };
}

/**
 * A scratch database and a storage folder of this test file's own, with the settings a test
 * server needs to use both (`serverEnv`). `close()` removes both.
 */
export async function useJobTestbed(label: string) {
  const scratch = await useScratchDatabase(label);
  const storage = await mkdtemp(join(tmpdir(), `twistlog-${label}-blobs-`));
  return {
    scratch,
    storage,
    serverEnv: { TWISTLOG_STORAGE_DIR: storage, DATABASE_NAME: scratch.name },
    async close() {
      await scratch.drop();
      await rm(storage, { recursive: true, force: true });
    },
  };
}
