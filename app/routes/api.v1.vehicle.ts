import { vehicleJson } from "~/lib/http/api-json.server";
import { idParam } from "~/lib/http/params";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.vehicle";
import { requireAccess } from "~/lib/http/access.server";
import { apiRoute } from "~/lib/http/edge.server";

/** GET /api/v1/vehicles/:vehicleId → { vehicle } (404 for another team's vehicle). */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const vehicle = await vehicleData(teamId).vehicle(idParam(params.vehicleId));
  return Response.json(
    { vehicle: vehicleJson(vehicle) },
    { headers: { "Cache-Control": "no-store" } },
  );
});
