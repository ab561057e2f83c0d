import { curvesForLogs, parseLogIds } from "~/lib/data/curves.server";
import { idParam } from "~/lib/http/params";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/vehicle.curves";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid } from "~/lib/domain/errors";

/**
 * GET /vehicles/:vehicleId/curves.json?logs=ID,ID… → { vehicleId, curves: CurveSet[] }: the
 * isolation and firing-order curves of the latest analyses, for overlays (comparison, vehicle
 * page). Without `logs`, the vehicle's finished drive logs, newest first (at most 8).
 */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const data = vehicleData(team.id);
  const vehicle = await data.vehicle(idParam(params.vehicleId));
  const asked = parseLogIds(new URL(request.url).searchParams.get("logs"));
  if (!asked) throw new Invalid("logs must be up to 8 drive-log ids separated by commas.");
  const ids = asked.length
    ? asked
    : (await data.logs(vehicle.id))
        .filter((l) => l.latestAnalysisId)
        .slice(0, 8)
        .map((l) => l.id);
  const curves = await curvesForLogs(team.id, vehicle.id, ids);
  return Response.json(
    { vehicleId: vehicle.id, curves },
    { headers: { "Cache-Control": "private, no-cache" } },
  );
});
