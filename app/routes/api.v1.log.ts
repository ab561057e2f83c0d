import { logJson } from "~/lib/http/api-json.server";
import { idParam } from "~/lib/http/params";
import { clientIp } from "~/lib/http/request.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.log";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/** GET /api/v1/logs/:logId → { log: { id, vehicleId, status, progress, error, … } }. */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const log = await vehicleData(teamId).log(idParam(params.logId));
  return Response.json({ log: logJson(log) }, { headers: { "Cache-Control": "no-store" } });
});

/**
 * DELETE /api/v1/logs/:logId (engineer and up) → 204: deletes the drive log with its analyses,
 * share links and comments (audited). Open sign-offs resting on it are superseded; their frozen
 * evidence and reports stay as they are.
 */
export const action = apiRoute(async ({ request, params, context }: Route.ActionArgs) => {
  if (request.method !== "DELETE") return apiError(405, "method_not_allowed", "Use GET or DELETE.");
  const { teamId, user } = await requireAccess(request, "engineer", { from: "api" });
  await vehicleData(teamId).removeLog(idParam(params.logId), {
    id: user.id,
    email: user.email,
    name: user.name,
    ip: clientIp(context),
  });
  return new Response(null, { status: 204, headers: { "Cache-Control": "no-store" } });
});
