import { signoffData } from "~/lib/data/signoffs.server";
import { idParam } from "~/lib/http/params";
import { pdfResponse } from "~/lib/http/pdf-response.server";
import type { Route } from "./+types/api.v1.signoff-report";
import { requireAccess } from "~/lib/http/access.server";
import { apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/signoffs/:signoffId/report.pdf (viewer and up): the evidence report. Once approved
 * it is the stored PDF, byte for byte, with its SHA-256 as ETag (it stays so when the sign-off is
 * later superseded or withdrawn); before that a draft made now from the frozen record,
 * watermarked "draft".
 */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const id = idParam(params.signoffId);
  const { pdf, fileName, stored } = await signoffData(teamId).report(id);
  return pdfResponse(request, pdf, fileName, { stored });
});
