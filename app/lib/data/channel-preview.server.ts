/**
 * The channel chooser's preview of the picked speeds (GET …/logs/:logId/channel-preview.json):
 * the stored file read through the analysis's ingest with the picked channels and units, then
 * decimated (speedPreview). Reading a file costs as much as the analysis's ingest, so answers
 * are kept in an in-memory LRU keyed by the blob key (the file's sha256), the picks and the
 * team's channel names, and requests for the same preview while it is made share the one read
 * (as the channel list does, channel-list.server.ts). Refusals are kept too: they depend on the
 * same key only; a read failure is not.
 */
import { sharedCache } from "../base/shared-cache";
import { blobStore } from "../infra/storage-settings.server";
import { ingestStream } from "../signal/ingest-stream.ts";
import { speedPreview, type SpeedPreview } from "../signal/preview-trace.ts";
import type { ChannelName, Outcome, SpeedUnit } from "../signal/types.ts";
import { namesKey, readFailed } from "./channel-list.server";

export interface PreviewPicks {
  time?: string;
  crank?: string;
  gearbox?: string;
  crankUnit?: SpeedUnit;
  gearboxUnit?: SpeedUnit;
}

/** A preview is about 10 kB; 32 of them are a few hundred kB. */
const previews = sharedCache<Outcome<SpeedPreview>>(
  32,
  (o) => o.ok || o.error.code !== "read_failed",
);

export function storedPreview(
  blobKey: string,
  picks: PreviewPicks,
  channelNames: readonly ChannelName[],
): Promise<Outcome<SpeedPreview>> {
  const key = `${blobKey}|${JSON.stringify([picks.time, picks.crank, picks.gearbox, picks.crankUnit, picks.gearboxUnit])}|${namesKey(channelNames)}`;
  return previews(key, async () => {
    const read = await ingestStream(blobStore().read(blobKey), {
      ...(picks.time ? { timeColumn: picks.time } : {}),
      ...(picks.crank ? { crankColumn: picks.crank } : {}),
      ...(picks.gearbox ? { gearboxColumn: picks.gearbox } : {}),
      ...(picks.crankUnit ? { crankUnit: picks.crankUnit } : {}),
      ...(picks.gearboxUnit ? { gearboxUnit: picks.gearboxUnit } : {}),
      ...(channelNames.length ? { channelNames } : {}),
    }).catch(readFailed<never>);
    return read.ok ? { ok: true, value: speedPreview(read.value), warnings: [] } : read;
  });
}
