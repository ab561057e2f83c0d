import { defineConfig } from "drizzle-kit";

// Only `drizzle-kit generate` is used; migrations are applied by scripts/migrate.ts
// (docs/decisions/002-local-mariadb.md explains why not push/migrate).
export default defineConfig({
  dialect: "mysql",
  schema: [
    "./app/lib/infra/db/schema.ts",
    "./app/lib/infra/db/schema-drive-logs.ts",
    "./app/lib/infra/db/schema-results.ts",
    "./app/lib/infra/db/schema-signoffs.ts",
  ],
  out: "./drizzle",
});
