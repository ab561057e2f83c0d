import Papa from "papaparse";
import { blobStore } from "~/lib/infra/storage-settings.server";
import type { Preview } from "~/lib/domain/column-mapping-schema";
import { readCsvHead } from "~/lib/signal/csv-head";

/**
 * The header and first data rows of a stored drive log, for the column-mapping step. The header
 * is found as the ingest finds it (behind a logger's preamble, its units row left out:
 * lib/signal/csv-head.ts), so the names offered are the ones the ingest reads. Reads only the
 * head and `rows` lines after it (at most 256 kB more), then stops the stream: a 1 GB file
 * costs the same as a small one. A file without a header gives an empty preview.
 */
export async function readPreview(blobKey: string, rows = 20): Promise<Preview> {
  const stream = blobStore().read(blobKey);
  try {
    const { head, prefix } = await readCsvHead(stream, {}, rows);
    if (!head.ok) return { header: [], rows: [] };
    const { headers, delimiter, dataStart } = head.value;
    const lines = new TextDecoder()
      .decode(prefix.subarray(dataStart))
      .split(/\r\n|\n|\r/)
      .filter((l) => l.trim() !== "")
      .slice(0, rows);
    const body = lines.map((l) => Papa.parse<string[]>(l, { delimiter }).data[0] ?? []);
    return { header: headers, rows: body };
  } finally {
    stream.destroy();
  }
}
