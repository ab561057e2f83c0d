import { idParam } from "~/lib/http/params";
import { resultCsv } from "~/lib/domain/result-csv";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/drive-log.result-csv";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";

/** GET /vehicles/:vehicleId/logs/:logId/result.csv: the latest analysis' curves as CSV (viewer and up). */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const data = vehicleData(team.id);
  const { log } = await data.vehicleLog(idParam(params.vehicleId), idParam(params.logId));
  const analysis = await data.latestAnalysis(log.id);
  if (!analysis) throw new NotFound("This drive log has no analysis yet.");
  const name = `drive-log-${log.id}-analysis-${analysis.version}.csv`;
  return new Response(resultCsv(analysis.result), {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Cache-Control": "private, no-store",
    },
  });
});
