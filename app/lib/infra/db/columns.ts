import { sql } from "drizzle-orm";
import { bigint, customType, datetime } from "drizzle-orm/mysql-core";

// Column helpers shared by the schema files. MariaDB notes (docs/stack-notes.md): no serial();
// ids are unsigned bigint auto-increment; datetimes keep milliseconds and are stored in UTC.
export const id = () =>
  bigint("id", { mode: "number", unsigned: true }).autoincrement().primaryKey();
export const ref = (name: string) => bigint(name, { mode: "number", unsigned: true });
export const at = (name: string) => datetime(name, { mode: "date", fsp: 3 });
/** A timestamp set by the database on insert (created_at unless named). */
export const createdAt = (name = "created_at") =>
  at(name)
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`);

/** Binary data up to 16 MB (MEDIUMBLOB), read and written as a Buffer. */
export const mediumBlob = customType<{ data: Buffer; driverData: Buffer }>({
  dataType: () => "mediumblob",
});
