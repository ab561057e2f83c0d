import { loadVehicleTrend } from "~/lib/data/trend.server";
import { idParam } from "~/lib/http/params";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.vehicle-trend";
import { requireAccess } from "~/lib/http/access.server";
import { apiRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";

/**
 * GET /api/v1/vehicles/:vehicleId/trend → the damper-health trend (app/lib/domain/trend.ts,
 * README "Damper health trend"); viewer and up, 404 for another team's vehicle.
 */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const vehicle = await vehicleData(teamId).vehicle(idParam(params.vehicleId));
  const trend = await loadVehicleTrend(teamId, vehicle.id);
  if (!trend) throw new NotFound("No such vehicle in this team.");
  return Response.json(trend, { headers: { "Cache-Control": "no-store" } });
});
