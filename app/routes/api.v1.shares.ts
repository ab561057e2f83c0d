import { listShares } from "~/lib/data/shares.server";
import type { Route } from "./+types/api.v1.shares";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/shares[?logId=ID][&vehicleId=ID] (engineer and up) → { shares: [...] }: the
 * caller's team's share links, newest first, with state, views and whether the caller may
 * manage each one. Tokens are never listed: only their sha256 is stored.
 */
export const loader = apiRoute(async ({ request }: Route.LoaderArgs) => {
  const { teamId, userId, role } = await requireAccess(request, "engineer", { from: "api" });
  const url = new URL(request.url);
  const filter: { logId?: number; vehicleId?: number } = {};
  for (const key of ["logId", "vehicleId"] as const) {
    const value = url.searchParams.get(key);
    if (value === null) continue;
    if (!/^\d{1,15}$/.test(value) || Number(value) < 1)
      return apiError(400, "bad_request", `${key} must be a positive whole number.`);
    filter[key] = Number(value);
  }
  const shares = await listShares(teamId, { userId, role }, filter);
  return Response.json({ shares }, { headers: { "Cache-Control": "no-store" } });
});
