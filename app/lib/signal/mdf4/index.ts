/**
 * ASAM MDF4 drive logs (ASAM MDF 4.2, ASAM e.V.; docs/mdf4.md): the channel list and the ingest
 * into a DriveLog, read by file offset, never the whole file in memory. The reader's parts:
 * file.ts (bounded reads), blocks.ts (checked block headers), structure.ts (groups and
 * channels), conversions.ts, data.ts (DT/DZ/DL/HL), records.ts (values), choose.ts, align.ts,
 * ingest.ts, list.ts. Every problem comes back as an Outcome error; nothing is thrown out.
 */
import type { IngestOptions } from "../ingest.ts";
import type { ChannelInfo, DriveLog, Outcome } from "../types.ts";
import { MdfFault, MdfFile } from "./file.ts";
import { ingestModel, notesWarning } from "./ingest.ts";
import { listModel } from "./list.ts";
import { readStructure, type MdfModel } from "./structure.ts";

/** Opens the file, reads its structure and runs `work`; faults and I/O errors become values. */
export async function withModel<T>(
  path: string,
  work: (file: MdfFile, model: MdfModel) => Promise<Outcome<T>>,
): Promise<Outcome<T>> {
  let file: MdfFile | undefined;
  try {
    file = await MdfFile.open(path);
    return await work(file, await readStructure(file));
  } catch (e) {
    return { ok: false, error: asIssue(e, path), warnings: [] };
  } finally {
    await file?.close().catch(() => undefined);
  }
}

function asIssue(e: unknown, path: string) {
  if (e instanceof MdfFault) return { code: e.code, message: e.message };
  const code = (e as NodeJS.ErrnoException | undefined)?.code;
  if (code === "ENOENT") return { code: "file_not_found", message: `no such file: ${path}` };
  if (code === "EISDIR") return { code: "read_failed", message: `${path} is a folder, not a file` };
  // Anything else is a damaged file this reader did not foresee: still a value, never a crash.
  const why = e instanceof Error ? e.message : String(e);
  return { code: "mdf4_unreadable", message: `the MDF4 file cannot be read (${why})` };
}

/** Every channel of the file at `path`, with the roles recognition gives them. */
export async function listMdf4Channels(
  path: string,
  options: IngestOptions = {},
): Promise<Outcome<ChannelInfo[]>> {
  return withModel(path, async (file, model) => ({
    ok: true,
    value: await listModel(file, model, options),
    warnings: notesWarning(model.notes),
  }));
}

/** The drive log in the file at `path` (channels as options pick or recognition finds them). */
export async function ingestMdf4File(
  path: string,
  options: IngestOptions = {},
  onProgress?: (fraction: number) => void,
): Promise<Outcome<DriveLog>> {
  return withModel(path, (file, model) => ingestModel(file, model, options, onProgress));
}
