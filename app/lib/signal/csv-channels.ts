/**
 * The channel list of a CSV drive log (STUB until it lands): every column with its unit, sample
 * count and range, in one streaming pass.
 */
import type { IngestOptions } from "./ingest.ts";
import type { ChannelInfo, Outcome } from "./types.ts";

export async function listCsvChannels(
  _chunks: AsyncIterable<string | Uint8Array>,
  _options: IngestOptions = {},
): Promise<Outcome<ChannelInfo[]>> {
  return {
    ok: false,
    error: { code: "not_implemented", message: "CSV channel lists are not available yet" },
    warnings: [],
  };
}
