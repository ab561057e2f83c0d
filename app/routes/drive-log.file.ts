import { idParam } from "~/lib/http/params";
import { requireTeamRole } from "~/lib/http/permissions.server";
import { rawFileResponse } from "~/lib/http/raw-file.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/drive-log.file";

/** GET /vehicles/:vehicleId/logs/:logId/file: the raw drive log as uploaded, streamed (viewer and up). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "viewer");
  const { log } = await vehicleData(team.id).vehicleLog(
    idParam(params.vehicleId),
    idParam(params.logId),
  );
  return rawFileResponse(log, { "Cache-Control": "private, no-store" });
}
