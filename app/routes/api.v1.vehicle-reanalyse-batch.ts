import { batchProgress } from "~/lib/data/reanalysis-batch.server";
import { idParam } from "~/lib/http/params";
import type { Route } from "./+types/api.v1.vehicle-reanalyse-batch";
import { requireAccess } from "~/lib/http/access.server";
import { apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/vehicles/:vehicleId/reanalyse/:batchId (viewer and up) → { batchId, vehicleId,
 * total, queued, running, done, failed, finished, logs: [{ driveLogId, fileName, damperVariant,
 * state, progress, stage, error, analysisVersion }] }: the progress of a "re-analyse all"
 * (app/lib/data/reanalysis-batch.server.ts); the vehicle page's panel polls it.
 */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const progress = await batchProgress(
    teamId,
    idParam(params.vehicleId),
    String(params.batchId ?? ""),
  );
  return Response.json(progress, { headers: { "Cache-Control": "no-store" } });
});
