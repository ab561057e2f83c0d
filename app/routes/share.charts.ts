import { chartsBody } from "~/lib/analyses/chart-bodies.server";
import { packedResponse } from "~/lib/http/packed-response.server";
import {
  shareForJson,
  shareHeaders,
  shareJsonError,
  sharedLogFor,
} from "~/lib/http/share-link.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/share.charts";
import { pageRoute } from "~/lib/http/edge.server";

/**
 * GET /s/:token/charts.json[?log=ID]: the chart data of the shared drive log's latest analysis
 * (same body as /vehicles/:vehicleId/logs/:logId/charts.json), authorised by the token alone.
 * `log` may only name a drive log of the share (a comparison's logs); any other id is a 404,
 * so a share link never reaches another drive log. Revoked or expired: 410 with no data, also
 * for a request with If-None-Match (the share is checked first). The packed body has an ETag,
 * but the answer stays no-store: the URL holds a secret.
 */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const active = await shareForJson(params.token);
  if (active instanceof Response) return active;
  const log = await sharedLogFor(active, request);
  if (log instanceof Response) return log;
  const body = await chartsBody(log.id, log.latestAnalysisId, (id) =>
    vehicleData(active.teamId).analysisOf(log.id, id),
  );
  if (body === null)
    return shareJsonError(404, "no_result", `This drive log has no analysis yet (${log.status}).`);
  return packedResponse(request, body, shareHeaders);
});
