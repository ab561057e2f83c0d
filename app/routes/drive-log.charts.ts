import { chartData } from "~/lib/chart-data";
import { idParam } from "~/lib/params";
import { invariantResponse, requireTeamRole } from "~/lib/permissions.server";
import { vehicleData } from "~/lib/vehicles.server";
import type { Route } from "./+types/drive-log.charts";

/**
 * GET /vehicles/:vehicleId/logs/:logId/charts.json: the chart data of the latest analysis
 * (app/lib/chart-data.ts), for the drive-log and rattle-check pages (viewer and up).
 * 404 with { error } until an analysis has finished.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "viewer");
  const data = vehicleData(team.id);
  const vehicleId = idParam(params.vehicleId);
  const log = await data.log(idParam(params.logId));
  invariantResponse(log.vehicleId === vehicleId, "No such drive log for this vehicle.", {
    status: 404,
  });
  const analysis = await data.latestAnalysis(log.id);
  if (!analysis)
    return Response.json(
      {
        error: {
          code: "no_result",
          message: `This drive log has no analysis yet (${log.status}).`,
        },
      },
      { status: 404 },
    );
  return Response.json(
    {
      logId: log.id,
      analysis: { id: analysis.id, version: analysis.version, createdAt: analysis.createdAt },
      charts: chartData(analysis.result),
    },
    // One analysis never changes; a new version has a new id, so the URL's answer may be cached briefly.
    { headers: { "Cache-Control": "private, max-age=30" } },
  );
}
