import { audit } from "~/lib/data/audit.server";
import { idParam } from "~/lib/http/params";
import { clientIp } from "~/lib/http/request.server";
import { SHARE_MAX_DAYS } from "~/lib/domain/share-schema";
import { auditActor, extendShare, getShare, revokeShare } from "~/lib/data/shares.server";
import type { Route } from "./+types/api.v1.share";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

const noStore = { "Cache-Control": "no-store" };

/** GET /api/v1/shares/:shareId (engineer and up) → { share: {...} }. */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId, userId, role } = await requireAccess(request, "engineer", { from: "api" });
  const share = await getShare(teamId, { userId, role }, idParam(params.shareId));
  return Response.json({ share }, { headers: noStore });
});

/**
 * DELETE /api/v1/shares/:shareId revokes the link → 200 { share } with state "revoked"
 * (again: the same answer, RFC 9110 §9.2.2 idempotent). PATCH with JSON { "expiresInDays" }
 * extends it to that many days from now. Only the sharer and admins (403 for others).
 */
export const action = apiRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const { teamId, userId, role } = await requireAccess(request, "engineer", { from: "api" });
  const shareId = idParam(params.shareId);
  const caller = { userId, role };
  if (request.method === "DELETE") {
    const before = await getShare(teamId, caller, shareId);
    const share = await revokeShare(teamId, caller, shareId);
    if (before.state !== "revoked")
      await audit({
        teamId,
        actor: await auditActor(userId),
        action: "share-revoked",
        detail: `share ${share.id}, through the API`,
        ip: clientIp(context),
      });
    return Response.json({ share }, { headers: noStore });
  }
  if (request.method === "PATCH") {
    let body: unknown;
    try {
      body = JSON.parse(await request.text());
    } catch {
      return apiError(400, "invalid_json", 'The body must be JSON, e.g. {"expiresInDays": 14}.');
    }
    const days = (body as { expiresInDays?: unknown } | null)?.expiresInDays;
    if (typeof days !== "number" || !Number.isInteger(days) || days < 1 || days > SHARE_MAX_DAYS)
      return apiError(
        400,
        "invalid_share",
        `expiresInDays must be a whole number of days from 1 to ${SHARE_MAX_DAYS}.`,
      );
    if ((await getShare(teamId, caller, shareId)).state === "revoked")
      return apiError(409, "share_revoked", "This share link is revoked; make a new one instead.");
    const share = await extendShare(teamId, caller, shareId, days);
    await audit({
      teamId,
      actor: await auditActor(userId),
      action: "share-extended",
      detail: `share ${share.id} to ${share.expiresAt}, through the API`,
      ip: clientIp(context),
    });
    return Response.json({ share }, { headers: noStore });
  }
  return apiError(405, "method_not_allowed", "Use GET, PATCH or DELETE.");
});
