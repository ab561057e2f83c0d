import { logJson } from "~/lib/http/api-json.server";
import { idParam } from "~/lib/http/params";
import { recordUploads } from "~/lib/http/record-uploads.server";
import { UploadError } from "~/lib/http/uploads.server";
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
 * POST /api/v1/vehicles/:vehicleId/logs (multipart: `file` — CSV text or ASAM MDF4 — optional
 * `condition`, `gear`, `damperVariant`, `testDate`, `notes`, and the channel choice `timeChannel`,
 * `crankChannel`, `gearboxChannel`, `crankUnit`, `gearboxUnit`; technician and up)
 * → 202 { log: { id, status, duplicateOf } }.
 */
export const action = apiRoute(async ({ request, params }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use GET or POST.");
  let uploaded;
  try {
    uploaded = await recordUploads(request, {
      access: () => requireAccess(request, "technician", { from: "api" }),
      vehicleId: params.vehicleId,
      maxFiles: 1,
    });
  } catch (error) {
    if (error instanceof UploadError) return apiError(error.status, error.code, error.message);
    throw error;
  }
  const [added] = uploaded.added;
  const log = added!.log;
  return Response.json(
    { log: { ...logJson(log), duplicateOf: added!.duplicateOf } },
    { status: 202, headers: { ...noStore, Location: `/api/v1/logs/${log.id}` } },
  );
});
