import { sniffFormat } from "~/lib/signal/format";

/** A file size for people: bytes in, "12.3 MB" out (binary multiples, as the upload limit is). */
export function formatSize(bytes: number): string {
  if (bytes >= 1024 ** 3) return `${(bytes / 1024 ** 3).toFixed(1)} GB`;
  if (bytes >= 1024 ** 2) return `${(bytes / 1024 ** 2).toFixed(1)} MB`;
  if (bytes >= 1024) return `${Math.round(bytes / 1024)} kB`;
  return `${bytes} B`;
}

/** Bytes the server's content check looks at (app/lib/http/uploads.server.ts): the same rule here. */
const SNIFF_BYTES = 64 * 1024;

/**
 * Why a chosen file cannot be sent, or null when it can: the server takes an ASAM MDF4 file (told
 * by its first 8 bytes) and refuses an empty file, one with a NUL byte in its first 64 kB
 * (binary; CSV never has one) and one with no line break in them (no header row). Checked in the
 * browser first, so such a file is never counted or sent.
 */
export async function refusalOf(file: File): Promise<string | null> {
  if (file.size === 0) return `${file.name} is empty: choose the drive log file itself.`;
  const head = new Uint8Array(await file.slice(0, SNIFF_BYTES).arrayBuffer());
  if (sniffFormat(head) === "mdf4") return null;
  if (head.includes(0))
    return `${file.name} is not a text file (it holds binary data) nor an ASAM MDF4 file: upload the drive log as CSV text or as ASAM MDF4 (.mf4).`;
  if (head.length >= SNIFF_BYTES && !head.includes(10) && !head.includes(13))
    return `${file.name} has no line break in its first 64 kB: it does not look like a CSV file with a header row.`;
  return null;
}

/** Server refusals that sending the same file again cannot change (the API's error codes). */
export const FINAL_REFUSALS = new Set([
  "empty_file",
  "not_text",
  "no_header_row",
  "too_large",
  "unsupported_media_type",
]);
