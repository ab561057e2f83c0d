import { packedStoredJson } from "~/lib/analyses/result.server";
import { idParam } from "~/lib/http/params";
import { packedResponse } from "~/lib/http/packed-response.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.log-result";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/logs/:logId/result → the stored result JSON of the latest analysis (404 until done).
 * Packed once per analysis version (gzip, brotli, strong ETag; If-None-Match → 304) after the
 * access check; private, revalidated (a re-analysis changes the latest version).
 */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const id = idParam(params.logId);
  // The log of the team (404 otherwise) names its latest analysis; that row is read by its id.
  const log = await vehicleData(teamId).log(id);
  const body = log.latestAnalysisId ? await packedStoredJson(teamId, log.latestAnalysisId) : null;
  if (!body)
    return apiError(
      404,
      "no_result",
      `Drive log ${id} has no analysis yet (status: ${log.status}).`,
    );
  return packedResponse(request, body);
});
