import { logJson } from "~/lib/http/api-json.server";
import { idParam } from "~/lib/http/params";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.log";
import { requireAccess } from "~/lib/http/access.server";
import { apiRoute } from "~/lib/http/edge.server";

/** GET /api/v1/logs/:logId → { log: { id, vehicleId, status, progress, error, … } }. */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const log = await vehicleData(teamId).log(idParam(params.logId));
  return Response.json({ log: logJson(log) }, { headers: { "Cache-Control": "no-store" } });
});
