import { drizzle } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import * as schema from "~/lib/infra/db/schema";
import { connectionOptions } from "./db-options.server";

function createDb() {
  const pool = mysql.createPool({
    ...connectionOptions(),
    connectionLimit: 10,
    idleTimeout: 60_000,
  });
  return { pool, db: drizzle(pool, { schema, mode: "default" }) };
}

// One client for the whole server; kept on globalThis so dev reloads don't open new pools.
const globalForDb = globalThis as unknown as { twistlogDb?: ReturnType<typeof createDb> };
const client = (globalForDb.twistlogDb ??= createDb());

export const db = client.db;
export const pool = client.pool;
export type Db = typeof db;

/** Resolves when the database answers a trivial query within `timeoutMs`. */
export async function pingDatabase(timeoutMs = 2_000): Promise<void> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(
      () => reject(Object.assign(new Error("no answer in time"), { code: "ETIMEDOUT" })),
      timeoutMs,
    );
  });
  try {
    await Promise.race([pool.query("SELECT 1"), timeout]);
  } finally {
    clearTimeout(timer);
  }
}
