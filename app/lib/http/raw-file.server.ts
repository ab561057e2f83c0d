import { Readable } from "node:stream";
import { blobStore } from "../infra/storage-settings.server";
import type { DriveLogRow } from "../data/vehicles.server";

/**
 * A drive log's raw file as uploaded, streamed as a download (the team's page and a share link
 * that allows it). Storage keeps it gzipped; the store's read() gunzips while it streams, so
 * nothing sits in memory. The bytes are served unchanged, and always as an attachment of a type
 * no browser runs: a drive log may hold cells that a spreadsheet reads as formulas (README).
 */
export function rawFileResponse(log: DriveLogRow, headers: Record<string, string> = {}): Response {
  const body = Readable.toWeb(blobStore().read(log.blobKey)) as ReadableStream<Uint8Array>;
  return new Response(body, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Length": String(log.sizeBytes),
      // X-Content-Type-Options: nosniff comes with every response (security-headers.server.ts);
      // tests/integration/raw-download.test.ts checks it here.
      "Content-Disposition": attachmentDisposition(log.fileName),
      ...headers,
    },
  });
}

/**
 * `attachment` (or `inline`) with the uploader's file name (RFC 6266 §4): a plain-ASCII fallback
 * in quotes for old clients, and the exact name as percent-encoded UTF-8 in `filename*` (RFC 8187
 * §3.2.1, attr-char only). No character of the name reaches the header as it is, so a quote, a
 * line break or a semicolon in it can neither end the parameter nor start a header of its own.
 */
export function attachmentDisposition(
  fileName: string,
  { type = "attachment", fallback = "drive-log.csv" } = {},
): string {
  // The fallback keeps what it can; a name with nothing of its own left (e.g. all CJK) gets ours.
  const plain = fileName.replace(/[^A-Za-z0-9._ -]+/g, "_").trim();
  const ascii = /[A-Za-z0-9]/.test(plain.replace(/\.[a-z]+$/i, "")) ? plain : fallback;
  // Buffer, not encodeURIComponent: it leaves ' ( ) * as they are (not attr-chars) and throws on
  // a lone surrogate, where Buffer writes U+FFFD.
  let encoded = "";
  for (const byte of Buffer.from(fileName, "utf8")) {
    const c = String.fromCharCode(byte);
    encoded += /[A-Za-z0-9!#$&+\-.^_`|~]/.test(c)
      ? c
      : `%${byte.toString(16).toUpperCase().padStart(2, "0")}`;
  }
  return `${type}; filename="${ascii}"; filename*=UTF-8''${encoded}`;
}
