import { chartsBody } from "~/lib/analyses/chart-bodies.server";
import { analysisParam } from "~/lib/http/analysis-param";
import { idParam } from "~/lib/http/params";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/drive-log.charts";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";

/**
 * GET /vehicles/:vehicleId/logs/:logId/charts.json: the chart data of the latest analysis
 * (app/lib/domain/chart-data.ts), for the drive-log and rattle-check pages (viewer and up);
 * `?analysis=<id>` gives an earlier version of this drive log (404 for any other id).
 * 404 with { error } until an analysis has finished.
 */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const data = vehicleData(team.id);
  const { log } = await data.vehicleLog(idParam(params.vehicleId), idParam(params.logId));
  const wanted = analysisParam(request);
  if (wanted !== undefined)
    // Checked before the cache is asked: the cache answers any id it holds.
    if (!(wanted !== null && (await data.versions(log.id)).some((v) => v.id === wanted)))
      throw new NotFound("No such analysis version of this drive log.");
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
});
