import { queueBatch } from "~/lib/data/reanalysis-batch.server";
import { reanalyseAllBodySchema } from "~/components/reanalyse-all-schema";
import { idParam } from "~/lib/http/params";
import { readJsonBody } from "~/lib/http/json-body.server";
import { clientIp } from "~/lib/http/request.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.vehicle-reanalyse";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/**
 * POST /api/v1/vehicles/:vehicleId/reanalyse (engineer and up), JSON { firingOrder?,
 * revsPerBlock?, binRpm?, damperVariant? } → 202 { batchId, jobs: [{ jobId, driveLogId }] }: a
 * new analysis of every drive log of the vehicle (or of one damper variant), queued at once
 * (app/lib/data/reanalysis-batch.server.ts). Its progress: GET …/reanalyse/:batchId. A setting out of
 * range is 400 invalid_settings naming the field, and nothing is queued; no drive log to
 * re-analyse, or some still being analysed, is 409.
 */
export const action = apiRoute(async ({ request, params, context }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.");
  const { teamId, user } = await requireAccess(request, "engineer", { from: "api" });
  const vehicleId = idParam(params.vehicleId);
  await vehicleData(teamId).vehicle(vehicleId); // 404 before the body is read
  const { damperVariant, ...overrides } = await readJsonBody(request, reanalyseAllBodySchema, {
    code: "invalid_settings",
    example: '{"revsPerBlock": 16, "binRpm": 50, "damperVariant": "B"}',
  });
  const batch = await queueBatch({
    teamId,
    vehicleId,
    overrides,
    damperVariant,
    actor: { id: user.id, email: user.email },
    ip: clientIp(context),
  });
  return Response.json(batch, {
    status: 202,
    headers: {
      "Cache-Control": "no-store",
      Location: `/api/v1/vehicles/${vehicleId}/reanalyse/${batch.batchId}`,
    },
  });
});

/** Queueing is a POST; the progress is read at …/reanalyse/:batchId. */
export const loader = apiRoute(async () =>
  apiError(405, "method_not_allowed", "Use POST; read a batch's progress at …/reanalyse/:batchId."),
);
