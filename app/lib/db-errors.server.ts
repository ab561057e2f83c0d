import type { Env } from "./env.server";

/**
 * Turns a mysql2 connection error into one line that says what to change.
 * Used by the server, the migration script and /healthz, so a wrong password
 * or a stopped database never reaches the user as a stack trace.
 */
export function describeDbError(error: unknown, env: Env): string {
  const e = error as { code?: string; message?: string; sqlMessage?: string };
  const where = `${env.DATABASE_HOST}:${env.DATABASE_PORT}`;
  switch (e?.code) {
    case "ECONNREFUSED":
      return `No database answers at ${where}: start it (npm start does) or set DATABASE_HOST and DATABASE_PORT.`;
    case "ETIMEDOUT":
    case "EHOSTUNREACH":
    case "ENOTFOUND":
      return `The database host ${env.DATABASE_HOST} cannot be reached (${e.code}): check DATABASE_HOST.`;
    case "ER_ACCESS_DENIED_ERROR":
    case "ER_DBACCESS_DENIED_ERROR":
      return `The database refused user '${env.DATABASE_USER}' (wrong password or no rights on '${env.DATABASE_NAME}'): check DATABASE_USER and DATABASE_PASSWORD.`;
    case "ER_BAD_DB_ERROR":
      return `Database '${env.DATABASE_NAME}' does not exist at ${where}: create it (npm start does) or set DATABASE_NAME.`;
    case "PROTOCOL_CONNECTION_LOST":
    case "ECONNRESET":
      return `The database at ${where} closed the connection: it may be restarting; try again.`;
    default:
      return `Database error at ${where}: ${(e?.sqlMessage ?? e?.message ?? String(error)).split("\n")[0]}`;
  }
}

// Codes of a database that is down, restarting or out of reach, as opposed to a refused query.
const unavailableCodes = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "ETIMEDOUT",
  "EHOSTUNREACH",
  "ENOTFOUND",
  "EPIPE",
  "PROTOCOL_CONNECTION_LOST",
  "PROTOCOL_SEQUENCE_TIMEOUT",
  "ER_SERVER_SHUTDOWN",
  "ER_CON_COUNT_ERROR",
  "ER_CONNECTION_KILLED",
]);

/**
 * True when `error` (or what it wraps: Drizzle puts the driver's error in `cause`) says the
 * database cannot be reached right now: the caller answers 503 and the request may be retried.
 */
export function isDbUnavailable(error: unknown): boolean {
  let e = error as { code?: unknown; fatal?: unknown; cause?: unknown } | undefined;
  for (let depth = 0; e && depth < 5; depth++) {
    if (typeof e.code === "string" && unavailableCodes.has(e.code)) return true;
    // mysql2 marks errors that end the connection itself as fatal.
    if (e.fatal === true) return true;
    e = e.cause as typeof e;
  }
  return false;
}
