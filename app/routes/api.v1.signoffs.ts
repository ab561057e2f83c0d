import { signoffData } from "~/lib/data/signoffs.server";
import type { Route } from "./+types/api.v1.signoffs";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/signoffs[?vehicleId=ID] (viewer and up) → { signoffs: [...] }: the team's
 * sign-offs, newest first, or one vehicle's (404 for a vehicle that is not the team's).
 */
export const loader = apiRoute(async ({ request }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const value = new URL(request.url).searchParams.get("vehicleId");
  const filter: { vehicleId?: number } = {};
  if (value !== null) {
    if (!/^\d{1,15}$/.test(value) || Number(value) < 1)
      return apiError(400, "bad_request", "vehicleId must be a positive whole number.");
    filter.vehicleId = Number(value);
  }
  const signoffs = await signoffData(teamId).list(filter);
  return Response.json({ signoffs }, { headers: { "Cache-Control": "no-store" } });
});
