import { Readable } from "node:stream";
import {
  shareForJson,
  shareHeaders,
  shareJsonError,
  sharedLogFromQuery,
} from "~/lib/share-page.server";
import { blobStore } from "~/lib/upload-settings.server";
import { vehicleData } from "~/lib/vehicles.server";
import type { Route } from "./+types/share.file";

/**
 * GET /s/:token/file[?log=ID]: the raw drive log, only when the sharer allowed it (403
 * otherwise), and only a drive log of the share (404 for any other).
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const active = await shareForJson(params.token);
  if (active instanceof Response) return active;
  if (!active.share.allowRawDownload)
    return shareJsonError(
      403,
      "forbidden",
      "The person who shared this did not allow downloading the raw file.",
    );
  const logId = sharedLogFromQuery(active.share, new URL(request.url).searchParams.get("log"));
  if (logId === null)
    return shareJsonError(404, "not_found", "That drive log is not part of this share link.");
  const log = await vehicleData(active.teamId).log(logId);
  if (log.vehicleId !== active.share.vehicleId)
    return shareJsonError(404, "not_found", "That drive log is not part of this share link.");
  const body = Readable.toWeb(blobStore().read(log.blobKey)) as ReadableStream<Uint8Array>;
  const ascii = log.fileName.replace(/[^A-Za-z0-9._ -]/g, "_");
  return new Response(body, {
    headers: {
      ...shareHeaders,
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Length": String(log.sizeBytes),
      "Content-Disposition": `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(log.fileName)}`,
    },
  });
}
