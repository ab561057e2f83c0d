import { chartsBody } from "~/lib/analyses/chart-bodies.server";
import { analysisParam } from "~/lib/http/analysis-param";
import { idParam } from "~/lib/http/params";
import { invariantResponse, requireTeamRole } from "~/lib/http/permissions.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/drive-log.charts";

/**
 * GET /vehicles/:vehicleId/logs/:logId/charts.json: the chart data of the latest analysis
 * (app/lib/domain/chart-data.ts), for the drive-log and rattle-check pages (viewer and up);
 * `?analysis=<id>` gives an earlier version of this drive log (404 for any other id).
 * 404 with { error } until an analysis has finished.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "viewer");
  const data = vehicleData(team.id);
  const { log } = await data.vehicleLog(idParam(params.vehicleId), idParam(params.logId));
  const wanted = analysisParam(request);
  if (wanted !== undefined)
    // Checked before the cache is asked: the cache answers any id it holds.
    invariantResponse(
      wanted !== null && (await data.versions(log.id)).some((v) => v.id === wanted),
      "No such analysis version of this drive log.",
      { status: 404 },
    );
  const body = await chartsBody(log.id, wanted ?? log.latestAnalysisId, (id) =>
    id === log.latestAnalysisId ? data.latestAnalysis(log.id) : data.analysisOf(log.id, id),
  );
  if (body === null)
    return Response.json(
      {
        error: {
          code: "no_result",
          message: `This drive log has no analysis yet (${log.status}).`,
        },
      },
      { status: 404 },
    );
  return new Response(body, {
    headers: {
      "Content-Type": "application/json; charset=utf-8",
      // One analysis never changes; a new version has a new id, so the URL's answer may be cached briefly.
      "Cache-Control": "private, max-age=30",
    },
  });
}
