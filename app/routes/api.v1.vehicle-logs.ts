import { logJson } from "~/lib/http/api-json.server";
import { idParam } from "~/lib/http/params";
import { blobStore, uploadMaxBytes } from "~/lib/infra/storage-settings.server";
import { discardBody, recordUpload, UploadError } from "~/lib/http/uploads.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.vehicle-logs";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

const noStore = { "Cache-Control": "no-store" };

/** GET /api/v1/vehicles/:vehicleId/logs → { logs: [...] }, newest first. */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const data = vehicleData(teamId);
  const vehicle = await data.vehicle(idParam(params.vehicleId));
  const logs = await data.logs(vehicle.id);
  return Response.json({ logs: logs.map(logJson) }, { headers: noStore });
});

/**
 * POST /api/v1/vehicles/:vehicleId/logs (multipart: `file`, optional `condition`, `gear`,
 * `damperVariant`, `testDate`, `notes`; technician and up) → 202 { log: { id, status, duplicateOf } }.
 */
export const action = apiRoute(async ({ request, params }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use GET or POST.");
  let teamId: number, userId: number, vehicle;
  try {
    ({ teamId, userId } = await requireAccess(request, "technician", { from: "api" }));
    vehicle = await vehicleData(teamId).vehicle(idParam(params.vehicleId));
  } catch (refusal) {
    await discardBody(request); // so the client reads the 401/403/404 instead of a reset
    throw refusal;
  }
  const data = vehicleData(teamId);
  if (vehicle.archivedAt) {
    await discardBody(request);
    return apiError(
      409,
      "vehicle_archived",
      "This vehicle is archived: restore it before uploading.",
    );
  }

  let added;
  try {
    [added] = await recordUpload(request, {
      store: blobStore(),
      maxBytes: uploadMaxBytes(),
      maxFiles: 1,
      record: (files, metadata) => data.addLogs({ vehicle, files, metadata, uploadedBy: userId }),
    });
  } catch (error) {
    if (error instanceof UploadError) return apiError(error.status, error.code, error.message);
    throw error;
  }
  const log = await data.log(added!.id);
  return Response.json(
    { log: { ...logJson(log), duplicateOf: added!.duplicateOf } },
    { status: 202, headers: { ...noStore, Location: `/api/v1/logs/${log.id}` } },
  );
});
