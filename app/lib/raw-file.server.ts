import { Readable } from "node:stream";
import { blobStore } from "./upload-settings.server";
import type { DriveLogRow } from "./vehicles.server";

/**
 * A drive log's raw file as uploaded, streamed as a download (the team's page and a share link
 * that allows it). Storage keeps it gzipped; the store's read() gunzips while it streams, so
 * nothing sits in memory.
 */
export function rawFileResponse(log: DriveLogRow, headers: Record<string, string> = {}): Response {
  const body = Readable.toWeb(blobStore().read(log.blobKey)) as ReadableStream<Uint8Array>;
  const ascii = log.fileName.replace(/[^A-Za-z0-9._ -]/g, "_");
  return new Response(body, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Length": String(log.sizeBytes),
      "Content-Disposition": `attachment; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(log.fileName)}`,
      ...headers,
    },
  });
}
