import { signoffInputSchema } from "~/lib/domain/signoff";
import { signoffData } from "~/lib/data/signoffs.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { idParam } from "~/lib/http/params";
import { appOrigin, clientIp } from "~/lib/http/request.server";
import { readJsonBody } from "~/lib/http/json-body.server";
import type { Route } from "./+types/api.v1.vehicle-signoffs";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

const noStore = { "Cache-Control": "no-store" };

/** GET /api/v1/vehicles/:vehicleId/signoffs (viewer and up) → { signoffs: [...] }, newest first. */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const signoffs = await signoffData(teamId).list({ vehicleId: idParam(params.vehicleId) });
  return Response.json({ signoffs }, { headers: noStore });
});

/**
 * POST /api/v1/vehicles/:vehicleId/signoffs (engineer and up), JSON { damperVariant, claims:
 * [{ targetId, logIds }], note, deviations?: [{ targetId, reason }] } → 201 { signoff } in state
 * "proposed". A claim that fails or is not covered without a deviation refuses the proposal
 * (400 signoff_blocked, naming each such claim); nothing is stored then.
 */
export const action = apiRoute(async ({ request, params, context }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use GET or POST.");
  const { teamId, userId, role } = await requireAccess(request, "engineer", { from: "api" });
  const vehicleId = idParam(params.vehicleId);
  await vehicleData(teamId).vehicle(vehicleId); // 404 before the body is read
  const input = await readJsonBody(request, signoffInputSchema, {
    code: "invalid_signoff",
    example:
      '{"damperVariant": "A", "claims": [{"targetId": 4, "logIds": [1, 3]}], "note": "Idle and run-up meet the targets."}',
  });
  const signoff = await signoffData(teamId).propose(vehicleId, input, {
    userId,
    role,
    ip: clientIp(context),
    origin: appOrigin(request),
  });
  return Response.json(
    { signoff },
    { status: 201, headers: { ...noStore, Location: `/api/v1/signoffs/${signoff.id}` } },
  );
});
