// npm run db:seed: the demo team and accounts (app/demo/demo-seed.server.ts). Safe to run again:
// a second run adds nothing. Refuses when SMTP_URL is set, i.e. on a real installation.
// --if-empty (npm start): seed only a database without any user; print the sign-ins if the
// demo accounts are there.
import { count, eq } from "drizzle-orm";
import { drizzle } from "drizzle-orm/mysql2";
import mysql from "mysql2/promise";
import { DEMO_PASSWORD, DEMO_TEAMS, seedDemo } from "../app/demo/demo-seed.server";
import { users } from "../app/lib/infra/db/schema";
import { describeDbError } from "../app/lib/infra/db-errors.server";
import { connectionOptions } from "../app/lib/infra/db-options.server";
import { getEnvOrExit } from "../app/lib/infra/env.server";

const env = getEnvOrExit();
if (env.SMTP_URL) {
  console.error(
    "SMTP_URL is set, so this looks like a real installation: the demo accounts are not created.",
  );
  process.exit(1);
}
const connection = await mysql.createConnection(connectionOptions(env)).catch((error: unknown) => {
  console.error(describeDbError(error, env));
  process.exit(1);
});
try {
  const db = drizzle(connection);
  const [existing] = await db.select({ n: count() }).from(users);
  if (process.argv.includes("--if-empty") && (existing?.n ?? 0) > 0) {
    const demo = await db
      .select({ id: users.id })
      .from(users)
      .where(eq(users.email, "admin@twistlog.test"));
    if (demo.length === 0) process.exit(0);
  } else {
    // Drive logs go through the app's own storage and queue (the server analyses them).
    const { seedDemoDriveLogs } = await import("../app/demo/demo-drive-logs.server");
    const added = (await seedDemo(db)) + (await seedDemoDriveLogs(DEMO_TEAMS[0].slug));
    console.log(
      added > 0 ? `demo data: ${added} rows added` : "demo data: already there, nothing changed",
    );
  }
  console.log(`demo sign-ins (password ${DEMO_PASSWORD}):`);
  for (const team of DEMO_TEAMS) {
    for (const m of team.members)
      console.log(`  ${m.email.padEnd(26)} ${m.role.padEnd(11)} ${team.name}`);
  }
} finally {
  await connection.end();
  const { pool } = await import("../app/lib/infra/db.server");
  await pool.end();
}
