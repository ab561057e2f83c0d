/**
 * Which columns a job reads a drive log with (issue 11 §3.1): columns chosen for this drive log
 * by hand always; otherwise the vehicle's remembered choice, but only when it fits this file's
 * header (fitRemembered); otherwise the header alone. A choice made for one odd file must not
 * break the vehicle's next, ordinary upload.
 */
import type { Readable } from "node:stream";
import { fitRemembered } from "~/lib/signal/columns";
import { readCsvHead } from "~/lib/signal/csv-head";
import type { AppliedMapping, IngestMapping } from "../domain/drive-log-terms";

const isEmpty = (m: IngestMapping | null | undefined) => !m || Object.keys(m).length === 0;

/**
 * The header names and units-row cells of a stored drive log, found as the ingest finds them
 * (behind a preamble, delimiter detected: lib/signal/csv-head.ts); null when the file has no
 * header. Reads only the head (at most 256 kB), then stops.
 */
async function readHead(stream: Readable): Promise<{ headers: string[]; units: string[] } | null> {
  try {
    const { head } = await readCsvHead(stream);
    return head.ok ? { headers: head.value.headers, units: head.value.units } : null;
  } finally {
    stream.destroy();
  }
}

/** The header names of a stored drive log (see readHead); null when it has none. */
export async function readHeader(stream: Readable): Promise<string[] | null> {
  return (await readHead(stream))?.headers ?? null;
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
    .then(() => readHead(open()))
    .catch(() => null);
  if (!header) return { source: "header", mapping: {} };
  const fitted = fitRemembered(header.headers, remembered!, header.units);
  if (fitted) return { source: "remembered", mapping: fitted as IngestMapping };
  return { source: "header", mapping: {}, skipped: remembered! };
}
