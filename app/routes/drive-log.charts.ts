import { chartsBody } from "~/lib/analyses/chart-bodies.server";
import { packedResponse } from "~/lib/http/packed-response.server";
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
 * 404 with { error } until an analysis has finished. The body is packed once per analysis version
 * (gzip, brotli, strong ETag; If-None-Match → 304), after the access checks.
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
  // analysisOf reads the version by its id (checked to be this log's), so a re-analysis that
  // finishes meanwhile cannot put another version's body under this id.
  const body = await chartsBody(log.id, wanted ?? log.latestAnalysisId, (id) =>
    data.analysisOf(log.id, id),
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
  // One analysis never changes, but the URL's latest one does: kept privately, revalidated.
  return packedResponse(request, body);
});
