import { idParam } from "~/lib/http/params";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.log-result";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/** GET /api/v1/logs/:logId/result → the stored result JSON of the latest analysis (404 until done). */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const data = vehicleData(teamId);
  const id = idParam(params.logId);
  const result = await data.latestResult(id);
  if (!result) {
    const log = await data.log(id);
    return apiError(
      404,
      "no_result",
      `Drive log ${id} has no analysis yet (status: ${log.status}).`,
    );
  }
  return Response.json(result, { headers: { "Cache-Control": "private, max-age=60" } });
});
