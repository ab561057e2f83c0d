/**
 * The channel list of a stored drive log (GET /api/v1/logs/:logId/channels and the drive-log
 * page's channel chooser): every channel with unit, group, rate, count, range and recognised role.
 *
 * Making it reads the whole file (listChannelsOfStream), so it is kept in an in-memory LRU keyed
 * by the blob key and the team's channel names. Why memory and not a column on drive_logs: the
 * list depends on the team's channel names as well as the file (the roles), so a stored copy
 * would go stale whenever the team edits its names; the blob key is the file's sha256, so an
 * entry can never be wrong for its key; and a restart costs one more read per file, not a
 * migration. Requests for the same list while it is being made share the one read.
 */
import { sharedCache } from "../base/shared-cache";
import { blobStore } from "../infra/storage-settings.server";
import { listChannelsOfStream } from "../signal/ingest-stream.ts";
import type { ChannelInfo, ChannelName, Outcome } from "../signal/types.ts";

/** Lists kept: a list of a few hundred channels is some tens of kB. Failures are not kept. */
const lists = sharedCache<Outcome<ChannelInfo[]>>(64, (o) => o.ok);

/** The part of a cache key the team's channel names make (they decide roles and units). */
export function namesKey(names: readonly ChannelName[]): string {
  return JSON.stringify(names.map((n) => [n.name, n.role, n.unit ?? ""]));
}

/** A thrown read error as the `read_failed` value every caller shows. */
export function readFailed<T>(e: unknown): Outcome<T> {
  return {
    ok: false,
    error: {
      code: "read_failed",
      message: `the file could not be read: ${e instanceof Error ? e.message : String(e)}`,
    },
    warnings: [],
  };
}

/** The channels of the stored file `blobKey`, with roles from `channelNames` then the built-in names. */
export function storedChannels(
  blobKey: string,
  channelNames: readonly ChannelName[],
): Promise<Outcome<ChannelInfo[]>> {
  return lists(`${blobKey}|${namesKey(channelNames)}`, () =>
    listChannelsOfStream(blobStore().read(blobKey), { channelNames }).catch(
      readFailed<ChannelInfo[]>,
    ),
  );
}

/** The public shape of one channel (`GET /api/v1/logs/:logId/channels`): exactly these fields. */
export function channelJson(c: ChannelInfo) {
  return {
    name: c.name,
    unit: c.unit,
    group: c.group,
    sampleRateHz: c.sampleRateHz,
    samples: c.samples,
    min: c.min,
    max: c.max,
    role: c.role,
  };
}
