import { idParam } from "~/lib/http/params";
import { rawFileResponse } from "~/lib/http/raw-file.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/drive-log.file";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

/** GET /vehicles/:vehicleId/logs/:logId/file: the raw drive log as uploaded, streamed (viewer and up). */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const { log } = await vehicleData(team.id).vehicleLog(
    idParam(params.vehicleId),
    idParam(params.logId),
  );
  return rawFileResponse(log, { "Cache-Control": "private, no-store" });
});
