/**
 * ASAM MDF4 drive logs (STUB until the MDF4 reader lands): the channel list and the ingest into
 * a DriveLog, read by file offset, never the whole file in memory.
 */
import type { IngestOptions } from "../ingest.ts";
import type { ChannelInfo, DriveLog, Outcome } from "../types.ts";

const notYet = { code: "mdf4_unsupported", message: "MDF4 files cannot be read yet" };

/** Every channel of the file at `path`, with the roles recognition gives them. */
export async function listMdf4Channels(
  _path: string,
  _options: IngestOptions = {},
): Promise<Outcome<ChannelInfo[]>> {
  return { ok: false, error: notYet, warnings: [] };
}

/** The drive log in the file at `path` (channels as options pick or recognition finds them). */
export async function ingestMdf4File(
  _path: string,
  _options: IngestOptions = {},
  _onProgress?: (fraction: number) => void,
): Promise<Outcome<DriveLog>> {
  return { ok: false, error: notYet, warnings: [] };
}
