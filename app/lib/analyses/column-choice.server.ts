/**
 * Which columns a job reads a drive log with (issue 11 §3.1): columns chosen for this drive log
 * by hand always; otherwise the vehicle's remembered choice, but only when it fits this file's
 * header (fitRemembered); otherwise the header alone. A choice made for one odd file must not
 * break the vehicle's next, ordinary upload.
 */
import Papa from "papaparse";
import type { Readable } from "node:stream";
import { StringDecoder } from "node:string_decoder";
import { fitRemembered } from "~/lib/signal/columns";
import { detectDelimiter, SAMPLE_LINES } from "~/lib/signal/ingest-scan";
import type { AppliedMapping, IngestMapping } from "../domain/drive-log-terms";

/** Enough for a header row and the first data rows; the ingest samples the same lines. */
const HEAD_BYTES = 64 * 1024;

const isEmpty = (m: IngestMapping | null | undefined) => !m || Object.keys(m).length === 0;

/**
 * The header names of a stored drive log, split as the ingest splits them (delimiter detected on
 * the first lines); null when the file has no text line. Reads at most 64 kB, then stops.
 */
export async function readHeader(stream: Readable): Promise<string[] | null> {
  const decoder = new StringDecoder("utf8");
  let text = "";
  try {
    for await (const chunk of stream) {
      text += decoder.write(chunk as Buffer);
      const lines = text.split("\n").filter((l) => l.trim() !== "").length;
      if (lines > SAMPLE_LINES || text.length >= HEAD_BYTES) break; // leaving ends the stream
    }
  } finally {
    stream.destroy();
  }
  const lines = text
    .replace(/^\uFEFF/, "")
    .split("\n")
    .map((l) => l.replace(/\r$/, ""))
    .filter((l) => l.trim() !== "")
    .slice(0, SAMPLE_LINES);
  if (lines.length === 0) return null;
  const delimiter = detectDelimiter(lines);
  const headers = (Papa.parse<string[]>(lines[0]!, { delimiter }).data[0] ?? []).map((h) =>
    h.trim(),
  );
  if (headers.length > 1 && headers[headers.length - 1] === "") headers.pop();
  return headers;
}

/**
 * Decides the columns for one run: `chosen` (set by hand for this drive log) wins; a
 * `remembered` choice applies where it fits the header that `open()` streams.
 */
export async function chooseColumns(
  chosen: IngestMapping,
  remembered: IngestMapping | null | undefined,
  open: () => Readable,
): Promise<AppliedMapping> {
  if (!isEmpty(chosen)) return { source: "chosen", mapping: chosen };
  if (isEmpty(remembered)) return { source: "header", mapping: {} };
  // A file that cannot be read fails in the worker with its own message; here it only means
  // the remembered choice cannot be checked, so it is left out.
  const header = await Promise.resolve()
    .then(() => readHeader(open()))
    .catch(() => null);
  if (!header) return { source: "header", mapping: {} };
  const fitted = fitRemembered(header, remembered!);
  if (fitted) return { source: "remembered", mapping: fitted as IngestMapping };
  return { source: "header", mapping: {}, skipped: remembered! };
}
