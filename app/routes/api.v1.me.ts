import type { Route } from "./+types/api.v1.me";
import { requireAccess } from "~/lib/http/access.server";
import { apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/me: who is calling — the token's owner, or the signed-in user of a browser
 * session, like every other /api/v1 route — with the team and the role there.
 */
export const loader = apiRoute(async ({ request }: Route.LoaderArgs) => {
  const { user, team, role } = await requireAccess(request, "viewer", { from: "api" });
  return Response.json(
    { user: { email: user.email }, team: { id: team.id, name: team.name }, role },
    { headers: { "Cache-Control": "no-store" } },
  );
});
