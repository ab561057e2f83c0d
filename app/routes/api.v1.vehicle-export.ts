import { Readable } from "node:stream";
import { openExportPack } from "~/lib/data/export-pack.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { parseExportQuery } from "~/lib/domain/export-pack";
import { vehicleJson } from "~/lib/http/api-json.server";
import { idParam } from "~/lib/http/params";
import { attachmentDisposition } from "~/lib/http/raw-file.server";
import type { Route } from "./+types/api.v1.vehicle-export";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/vehicles/:vehicleId/export.zip[?damperVariant=B] → the export pack (viewer and up;
 * 404 for another team's vehicle): per analysed drive log its curves as CSV in SI units, the
 * result JSON and the source metadata, with a manifest of SHA-256 checksums and a README
 * (docs/export-pack.md). Streamed: the zip is written while it is sent.
 */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const query = parseExportQuery(new URL(request.url).searchParams);
  if (!query.ok) return apiError(400, "invalid_export_query", query.message);
  const vehicle = await vehicleData(teamId).vehicle(idParam(params.vehicleId));
  const pack = await openExportPack({
    teamId,
    vehicle,
    vehicleJson: vehicleJson(vehicle),
    damperVariant: query.query.damperVariant,
  });
  return new Response(Readable.toWeb(pack.stream) as ReadableStream<Uint8Array>, {
    headers: {
      "Content-Type": "application/zip",
      "Content-Disposition": attachmentDisposition(pack.fileName),
      "Cache-Control": "no-store",
    },
  });
});
