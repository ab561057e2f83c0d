import { audit } from "~/lib/data/audit.server";
import { idParam } from "~/lib/http/params";
import { appOrigin, clientIp } from "~/lib/http/request.server";
import { apiCreateShareSchema } from "~/lib/domain/share-schema";
import { auditActor, createShare, listShares, shareUrl } from "~/lib/data/shares.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.log-shares";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

const noStore = { "Cache-Control": "no-store" };

/** GET /api/v1/logs/:logId/shares (engineer and up) → { shares: [...] }: this drive log's links. */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId, userId, role } = await requireAccess(request, "engineer", { from: "api" });
  const log = await vehicleData(teamId).log(idParam(params.logId));
  const shares = await listShares(teamId, { userId, role }, { logId: log.id });
  return Response.json({ shares }, { headers: noStore });
});

/**
 * POST /api/v1/logs/:logId/shares (engineer and up), JSON { "expiresInDays"?, "note"?,
 * "allowRawDownload"? } → 201 { "share": { "id", "url", "expiresAt" } }. The url carries the
 * token; it is in this answer only (the database keeps its sha256).
 */
export const action = apiRoute(async ({ request, params, context }: Route.ActionArgs) => {
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use GET or POST.");
  const { teamId, userId, role } = await requireAccess(request, "engineer", { from: "api" });
  const logId = idParam(params.logId);
  const text = await request.text();
  let body: unknown = {};
  if (text.trim()) {
    try {
      body = JSON.parse(text);
    } catch {
      return apiError(400, "invalid_json", 'The body must be JSON, e.g. {"expiresInDays": 14}.');
    }
  }
  const parsed = apiCreateShareSchema.safeParse(body);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const message =
      issue?.code === "unrecognized_keys"
        ? `Unknown field ${issue.keys.join(", ")}: send expiresInDays, note or allowRawDownload.`
        : (issue?.message ?? "The body is not valid.");
    return apiError(400, "invalid_share", message);
  }
  const made = await createShare({
    teamId,
    caller: { userId, role },
    subject: { kind: "log", logId },
    ...parsed.data,
  });
  await audit({
    teamId,
    actor: await auditActor(userId),
    action: "share-created",
    detail: `share ${made.id} of drive log ${logId}, ${parsed.data.expiresInDays} days, through the API`,
    ip: clientIp(context),
  });
  return Response.json(
    {
      share: {
        id: made.id,
        url: shareUrl(appOrigin(request), made.token),
        expiresAt: made.expiresAt.toISOString(),
      },
    },
    { status: 201, headers: { ...noStore, Location: `/api/v1/shares/${made.id}` } },
  );
});
