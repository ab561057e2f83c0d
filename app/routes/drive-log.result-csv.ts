import { idParam } from "~/lib/http/params";
import { invariantResponse, requireTeamRole } from "~/lib/http/permissions.server";
import { resultCsv } from "~/lib/domain/result-csv";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/drive-log.result-csv";

/** GET /vehicles/:vehicleId/logs/:logId/result.csv: the latest analysis' curves as CSV (viewer and up). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "viewer");
  const data = vehicleData(team.id);
  const { log } = await data.vehicleLog(idParam(params.vehicleId), idParam(params.logId));
  const analysis = await data.latestAnalysis(log.id);
  invariantResponse(analysis, "This drive log has no analysis yet.", { status: 404 });
  const name = `drive-log-${log.id}-analysis-${analysis.version}.csv`;
  return new Response(resultCsv(analysis.result), {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Cache-Control": "private, no-store",
    },
  });
}
