import type { Db } from "./db.server";
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

// Codes of a database that cannot be reached right now (as opposed to a wrong query).
const UNAVAILABLE = new Set([
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
 * The connection error behind `error`, when the database is down or unreachable: drizzle
 * wraps mysql2's errors (DrizzleQueryError, the original in `cause`), so the chain is walked.
 */
export function databaseUnavailable(error: unknown): { code?: string; message?: string } | null {
  let e = error as { code?: unknown; message?: unknown; cause?: unknown } | undefined;
  for (let depth = 0; e && typeof e === "object" && depth < 5; depth++) {
    if (typeof e.code === "string" && UNAVAILABLE.has(e.code)) return e as { code: string };
    // mysql2 marks errors that end the connection itself as fatal.
    if ((e as { fatal?: unknown }).fatal === true)
      return { code: typeof e.code === "string" ? e.code : "PROTOCOL_CONNECTION_LOST" };
    // mysql2 on a connection the server already closed: no code, only this message.
    if (typeof e.message === "string" && /connection is in closed state/i.test(e.message))
      return { code: "PROTOCOL_CONNECTION_LOST", message: e.message };
    e = e.cause as typeof e;
  }
  return null;
}

/** What a user or API caller reads while the database is unavailable (no host or port). */
export const DATABASE_UNAVAILABLE_MESSAGE =
  "The database is not available right now, so nothing was read or changed. Try again in a minute; if it stays, tell whoever runs Twistlog.";

// Requests that failed because the database was down. On globalThis: server/request-handler.ts
// and the React Router build each load their own copy of this module.
const downKey = Symbol.for("twistlog.database-down-requests");
const downRequests: WeakSet<Request> = ((globalThis as Record<symbol, unknown>)[downKey] ??=
  new WeakSet<Request>()) as WeakSet<Request>;

/** Notes that `request` failed on an unavailable database (app/entry.server.tsx handleError). */
export function markDatabaseDown(request: Request): void {
  downRequests.add(request);
}

export function failedOnDatabase(request: Request): boolean {
  return downRequests.has(request);
}

/**
 * Whether an error (or one in its `cause` chain: Drizzle wraps mysql2's) is InnoDB choosing this
 * transaction as a deadlock victim: MariaDB error 1213, ER_LOCK_DEADLOCK. The server has rolled
 * it back whole, so running it again is safe (MariaDB's error reference: "try restarting
 * transaction").
 */
export function isDeadlock(error: unknown): boolean {
  for (let e = error as { code?: unknown; errno?: unknown; cause?: unknown } | undefined; e;) {
    if (e.errno === 1213 || e.code === "ER_LOCK_DEADLOCK") return true;
    e = e.cause as typeof e;
  }
  return false;
}

/**
 * Runs a write transaction, again when it was a deadlock victim (up to `attempts` times in all,
 * with a short random pause so two victims do not meet again). Two admins inviting at the same
 * moment lock the same index gaps; one of them loses and is retried instead of answering 500.
 */
export async function retryOnDeadlock<T>(run: () => Promise<T>, attempts = 3): Promise<T> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await run();
    } catch (error) {
      if (attempt >= attempts || !isDeadlock(error)) throw error;
      await new Promise((resolve) => setTimeout(resolve, 5 + Math.random() * 20 * attempt));
    }
  }
}

/** A transaction of the app's database (the `tx` a transaction's callback gets). */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/**
 * `db.transaction(run)`, run again whole when it was a deadlock victim (retryOnDeadlock). Every
 * write transaction goes through it: besides InnoDB's own deadlocks, a MariaDB Galera cluster
 * fails a transaction at commit with the same error 1213 when a write set from another node won
 * certification against it. So `run` must only touch the database through `tx` (a retry runs
 * it again from the start).
 */
export function writeTransaction<T>(db: Db, run: (tx: Tx) => Promise<T>): Promise<T> {
  // 5 attempts: in the cluster drill (tests/cluster) two instances claiming and saving jobs on
  // different nodes exhausted 3 once (the job runner then tried again at its next poll).
  return retryOnDeadlock(() => db.transaction(run), 5);
}
