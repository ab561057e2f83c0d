import { drizzle } from "drizzle-orm/mysql2";
import { migrate } from "drizzle-orm/mysql2/migrator";
import mysql from "mysql2/promise";
import { fileURLToPath } from "node:url";

export const migrationsFolder = fileURLToPath(new URL("../../../../drizzle", import.meta.url));

/**
 * Applies the committed drizzle-kit migrations on one connection (docs/stack-notes.md: drizzle-kit
 * migrate hides the SQL error). Throws MigrationError whose message names the failing
 * statement and MariaDB's own error text.
 */
export async function applyMigrations(options: mysql.ConnectionOptions): Promise<void> {
  const connection = await mysql.createConnection({ ...options, multipleStatements: false });
  try {
    await migrate(drizzle(connection), { migrationsFolder });
  } catch (error) {
    const cause = (error as { cause?: { sqlMessage?: string; code?: string } }).cause;
    const query = (error as { query?: string }).query;
    if (cause?.sqlMessage) {
      const statement = query ? ` in: ${query.replace(/\s+/g, " ").slice(0, 200)}` : "";
      throw new MigrationError(`migration failed: ${cause.code}: ${cause.sqlMessage}${statement}`);
    }
    throw error;
  } finally {
    await connection.end();
  }
}

export class MigrationError extends Error {
  override name = "MigrationError";
}
