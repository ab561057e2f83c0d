import Papa from "papaparse";
import { StringDecoder } from "node:string_decoder";
import { blobStore } from "~/lib/infra/storage-settings.server";
import type { Preview } from "~/lib/domain/column-mapping-schema";

/**
 * The header and first rows of a stored drive log, for the column-mapping step. Reads only
 * until `rows + 1` lines (or 256 kB) have arrived, then stops the stream: a 1 GB file costs the
 * same as a small one.
 */
export async function readPreview(blobKey: string, rows = 20): Promise<Preview> {
  const stream = blobStore().read(blobKey);
  const decoder = new StringDecoder("utf8");
  let text = "";
  try {
    for await (const chunk of stream) {
      text += decoder.write(chunk as Buffer);
      const lines = text.split(/\r\n|\n|\r/).length - 1;
      if (lines > rows + 1 || text.length > 256 * 1024) break; // leaving the loop ends the stream
    }
  } finally {
    stream.destroy();
  }
  const lines = text
    .split(/\r\n|\n|\r/)
    .filter((l) => l.trim() !== "")
    .slice(0, rows + 1);
  const parsed = Papa.parse<string[]>(lines.join("\n"), { skipEmptyLines: true });
  const [header = [], ...body] = parsed.data;
  return { header: header.map((h) => h.trim()), rows: body };
}
