import { idParam } from "~/lib/http/params";
import { requireTeamRole } from "~/lib/http/permissions.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/vehicle.status";

/**
 * GET /vehicles/:vehicleId/status → { logs: [{ id, status, progress, stage }] }: what the vehicle
 * page polls while analyses run (one request for all its drive logs instead of one per log).
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "viewer");
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
}
