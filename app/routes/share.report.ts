import { signoffData } from "~/lib/data/signoffs.server";
import { apiRoute } from "~/lib/http/edge.server";
import { shareForJson, shareHeaders, shareJsonError } from "~/lib/http/share-link.server";
import type { Route } from "./+types/share.report";

/**
 * GET /s/:token/report.pdf — a shared sign-off's evidence report (issue 16): the approved PDF
 * byte for byte, or a draft of a sign-off that was not approved. Only a sign-off's link has one
 * (404 for a drive log's or a comparison's); 410 once the link is revoked or expired.
 */
export const loader = apiRoute(async ({ params }: Route.LoaderArgs) => {
  const active = await shareForJson(params.token);
  if (active instanceof Response) return active;
  const { share, teamId } = active;
  if (share.kind !== "signoff" || !share.signoffId)
    return shareJsonError(404, "not_found", "This share link has no evidence report.");
  const { pdf, fileName } = await signoffData(teamId).report(share.signoffId);
  return new Response(new Uint8Array(pdf), {
    headers: {
      ...shareHeaders,
      "Content-Type": "application/pdf",
      "Content-Length": String(pdf.length),
      "Content-Disposition": `attachment; filename="${fileName.replace(/[^\w.-]/g, "_")}"`,
      "X-Content-Type-Options": "nosniff",
    },
  });
});
