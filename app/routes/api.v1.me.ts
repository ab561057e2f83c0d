import { apiRoute, requireApiAccess } from "~/lib/http/api-access.server";
import type { Route } from "./+types/api.v1.me";

/**
 * GET /api/v1/me: who is calling — the token's owner, or the signed-in user of a browser
 * session, like every other /api/v1 route — with the team and the role there.
 */
export const loader = apiRoute(async ({ request }: Route.LoaderArgs) => {
  const { user, team, role } = await requireApiAccess(request, "viewer");
  return Response.json(
    { user: { email: user.email }, team: { id: team.id, name: team.name }, role },
    { headers: { "Cache-Control": "no-store" } },
  );
});
