import { idParam } from "~/lib/http/params";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/vehicle.status";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

/**
 * GET /vehicles/:vehicleId/status → { logs: [{ id, status, progress, stage }] }: what the vehicle
 * page polls while analyses run (one request for all its drive logs instead of one per log).
 */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const data = vehicleData(team.id);
  const vehicle = await data.vehicle(idParam(params.vehicleId));
  const logs = await data.logs(vehicle.id);
  return Response.json(
    {
      logs: logs.map((l) => ({
        id: l.id,
        status: l.status,
        progress: l.status === "done" ? 1 : l.progress,
        stage: l.stage,
      })),
    },
    { headers: { "Cache-Control": "no-store" } },
  );
});
