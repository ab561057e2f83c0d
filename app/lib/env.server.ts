import { z } from "zod";

/**
 * Environment settings, parsed once. Defaults match the project-local MariaDB that
 * scripts/mariadb.sh starts (127.0.0.1:3407), so `npm start` needs no configuration.
 */
const envSchema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  HOST: z.string().min(1).default("127.0.0.1"),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  DATABASE_HOST: z.string().min(1).default("127.0.0.1"),
  DATABASE_PORT: z.coerce.number().int().min(1).max(65535).default(3407),
  DATABASE_USER: z.string().min(1).default("twistlog"),
  DATABASE_PASSWORD: z.string().default("twistlog-local"),
  DATABASE_NAME: z
    .string()
    .regex(/^[A-Za-z0-9_]+$/, "letters, digits and underscores only")
    .default("twistlog"),
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

/** Parsed settings; throws an EnvError with a one-line message when a value is wrong. */
export function getEnv(source: NodeJS.ProcessEnv = process.env): Env {
  if (source === process.env && cached) return cached;
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const name = issue?.path.join(".") ?? "environment";
    throw new EnvError(
      `${name} is not valid (${issue?.message ?? "unknown problem"}): fix it or unset it to use the default.`,
    );
  }
  if (source === process.env) cached = parsed.data;
  return parsed.data;
}

export class EnvError extends Error {
  override name = "EnvError";
}
