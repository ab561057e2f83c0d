import type mysql from "mysql2/promise";
import { getEnv, type Env } from "./env.server";

/** Connection options shared by the server's pool and the single connections scripts open. */
export function connectionOptions(env: Env = getEnv()): mysql.ConnectionOptions {
  return {
    host: env.DATABASE_HOST,
    port: env.DATABASE_PORT,
    user: env.DATABASE_USER,
    password: env.DATABASE_PASSWORD,
    database: env.DATABASE_NAME,
    timezone: "Z",
    decimalNumbers: true,
    connectTimeout: 5_000,
  };
}
