import { Readable } from "node:stream";
import { idParam } from "~/lib/params";
import { invariantResponse, requireTeamRole } from "~/lib/permissions.server";
import { blobStore } from "~/lib/upload-settings.server";
import { vehicleData } from "~/lib/vehicles.server";
import type { Route } from "./+types/drive-log.file";

/** GET /vehicles/:vehicleId/logs/:logId/file: the raw drive log as uploaded, streamed (viewer and up). */
export async function loader({ request, params }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "viewer");
  const data = vehicleData(team.id);
  const vehicle = await data.vehicle(idParam(params.vehicleId));
  const log = await data.log(idParam(params.logId));
  invariantResponse(log.vehicleId === vehicle.id, "No such drive log for this vehicle.", {
    status: 404,
  });
  // Storage keeps it gzipped; the store's read() gunzips while it streams, so nothing sits in memory.
  const body = Readable.toWeb(blobStore().read(log.blobKey)) as ReadableStream<Uint8Array>;
  const ascii = log.fileName.replace(/[^A-Za-z0-9._ -]/g, "_");
  return new Response(body, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Length": String(log.sizeBytes),
      "Content-Disposition": `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(log.fileName)}`,
      "Cache-Control": "private, no-store",
    },
  });
}
