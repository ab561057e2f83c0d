import { sql } from "drizzle-orm";
import { bigint, datetime, index, mysqlTable, uniqueIndex, varchar } from "drizzle-orm/mysql-core";

// MariaDB notes (STACK-NOTES.md): no serial(); ids are unsigned bigint auto-increment;
// datetimes keep milliseconds and are stored in UTC.
const id = () => bigint("id", { mode: "number", unsigned: true }).autoincrement().primaryKey();
const ref = (name: string) => bigint(name, { mode: "number", unsigned: true });
const createdAt = () =>
  datetime("created_at", { mode: "date", fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`);

/** A team (workspace): owns its vehicles, drive logs and results. */
export const teams = mysqlTable(
  "teams",
  {
    id: id(),
    name: varchar("name", { length: 120 }).notNull(),
    slug: varchar("slug", { length: 64 }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("teams_slug_unique").on(t.slug)],
);

export const users = mysqlTable(
  "users",
  {
    id: id(),
    email: varchar("email", { length: 254 }).notNull(),
    name: varchar("name", { length: 120 }).notNull(),
    passwordHash: varchar("password_hash", { length: 255 }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_unique").on(t.email)],
);

/** A signed-in browser session; the cookie carries only this row's id. */
export const sessions = mysqlTable(
  "sessions",
  {
    id: varchar("id", { length: 64 }).primaryKey(),
    userId: ref("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    expiresAt: datetime("expires_at", { mode: "date", fsp: 3 }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [index("sessions_user_idx").on(t.userId)],
);
