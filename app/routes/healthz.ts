import { describeDbError } from "~/lib/infra/db-errors.server";
import { pingDatabase } from "~/lib/infra/db.server";
import { getEnv } from "~/lib/infra/env.server";

const headers = { "Cache-Control": "no-store" };

/** GET /healthz: 200 {"ok":true,"db":"up"} only when the database answers; 503 with a reason otherwise. */
export async function loader() {
  try {
    await pingDatabase();
    return Response.json({ ok: true, db: "up" }, { headers });
  } catch (error) {
    return Response.json(
      { ok: false, db: "down", reason: describeDbError(error, getEnv()) },
      { status: 503, headers },
    );
  }
}
