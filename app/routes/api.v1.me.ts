import { requireApiCaller } from "~/lib/api.server";
import type { Route } from "./+types/api.v1.me";

/** GET /api/v1/me: who the token belongs to, its team and the owner's role there. */
export async function loader({ request }: Route.LoaderArgs) {
  const { user, team, role } = await requireApiCaller(request);
  return Response.json(
    { user: { email: user.email }, team: { id: team.id, name: team.name }, role },
    { headers: { "Cache-Control": "no-store" } },
  );
}
