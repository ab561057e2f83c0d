// Applies every committed migration in drizzle/ to the configured database.
// On failure: one line on stderr (the SQL error or what to change) and exit code 1.
import { applyMigrations, MigrationError } from "../app/lib/infra/db/migrate.server";
import { describeDbError } from "../app/lib/infra/db-errors.server";
import { connectionOptions } from "../app/lib/infra/db-options.server";
import { getEnvOrExit } from "../app/lib/infra/env.server";

const env = getEnvOrExit();
try {
  await applyMigrations(connectionOptions(env));
  console.log(
    `migrations applied to ${env.DATABASE_NAME} at ${env.DATABASE_HOST}:${env.DATABASE_PORT}`,
  );
} catch (error) {
  console.error(error instanceof MigrationError ? error.message : describeDbError(error, env));
  process.exit(1);
}
