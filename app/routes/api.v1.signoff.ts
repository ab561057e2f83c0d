import { signoffData } from "~/lib/data/signoffs.server";
import { idParam } from "~/lib/http/params";
import type { Route } from "./+types/api.v1.signoff";
import { requireAccess } from "~/lib/http/access.server";
import { apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/signoffs/:signoffId (viewer and up) → { signoff, record }: the sign-off with its
 * state, digest and history, and the frozen record it rests on (docs/signoff.md). Once approved,
 * the digest is the SHA-256 of the record's canonical JSON (RFC 8785).
 */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const id = idParam(params.signoffId);
  const data = signoffData(teamId);
  const signoff = await data.get(id);
  const { record } = await data.record(id);
  return Response.json({ signoff, record }, { headers: { "Cache-Control": "no-store" } });
});
