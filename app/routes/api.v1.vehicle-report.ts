import { vehicleDraftReport } from "~/lib/data/signoff-report.server";
import { idParam } from "~/lib/http/params";
import { pdfResponse } from "~/lib/http/pdf-response.server";
import type { Route } from "./+types/api.v1.vehicle-report";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/vehicles/:vehicleId/report.pdf[?damperVariant=B] (viewer and up): a draft evidence
 * report of the vehicle's current state — every target over every finished drive log of the
 * damper variant (default: the vehicle's own) — watermarked "draft", made anew on each request.
 */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const vehicleId = idParam(params.vehicleId);
  const variant = new URL(request.url).searchParams.get("damperVariant");
  if (variant !== null && (!variant.trim() || variant.length > 80))
    return apiError(
      400,
      "bad_request",
      "damperVariant names a damper variant of 1 to 80 characters.",
    );
  const { pdf, fileName } = await vehicleDraftReport(teamId, vehicleId, variant?.trim());
  return pdfResponse(request, pdf, fileName, { stored: false });
});
