import { curvesForLogs, parseLogIds } from "~/lib/data/curves.server";
import { shareForJson, shareHeaders, shareJsonError } from "~/lib/http/share-link.server";
import { sharedLogIds } from "~/lib/data/shares.server";
import type { Route } from "./+types/share.curves";
import { pageRoute } from "~/lib/http/edge.server";

/**
 * GET /s/:token/curves.json[?logs=ID,ID…] → { vehicleId, curves: CurveSet[] }: the isolation and
 * firing-order curves of the shared drive logs, for the comparison overlay. `logs` may pick
 * among the share's own drive logs only; an id outside the share is refused with 404.
 */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const active = await shareForJson(params.token);
  if (active instanceof Response) return active;
  const shared = sharedLogIds(active.share);
  const asked = parseLogIds(new URL(request.url).searchParams.get("logs"));
  if (asked === null)
    return shareJsonError(
      400,
      "bad_request",
      "logs must be up to 8 drive-log ids separated by commas.",
    );
  const outside = asked.filter((id) => !shared.includes(id));
  if (outside.length)
    return shareJsonError(404, "not_found", "Those drive logs are not part of this share link.");
  const ids = asked.length ? asked : shared;
  const curves = await curvesForLogs(active.teamId, active.share.vehicleId, ids);
  return Response.json({ vehicleId: active.share.vehicleId, curves }, { headers: shareHeaders });
});
