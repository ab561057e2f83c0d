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
import { Lru } from "../base/lru";
import { blobStore } from "../infra/storage-settings.server";
import { listChannelsOfStream } from "../signal/ingest-stream.ts";
import type { ChannelInfo, ChannelName, Outcome } from "../signal/types.ts";

/** Lists kept: a list of a few hundred channels is some tens of kB. */
const cache = new Lru<string, ChannelInfo[]>(64);
const making = new Map<string, Promise<Outcome<ChannelInfo[]>>>();

function keyOf(blobKey: string, names: readonly ChannelName[]): string {
  return `${blobKey}|${JSON.stringify(names.map((n) => [n.name, n.role, n.unit ?? ""]))}`;
}

/** The channels of the stored file `blobKey`, with roles from `channelNames` then the built-in names. */
export async function storedChannels(
  blobKey: string,
  channelNames: readonly ChannelName[],
): Promise<Outcome<ChannelInfo[]>> {
  const key = keyOf(blobKey, channelNames);
  const hit = cache.get(key);
  if (hit) return { ok: true, value: hit, warnings: [] };
  let pending = making.get(key);
  if (!pending) {
    pending = listChannelsOfStream(blobStore().read(blobKey), { channelNames })
      .catch((e: unknown): Outcome<ChannelInfo[]> => ({
        ok: false,
        error: {
          code: "read_failed",
          message: `the file could not be read: ${e instanceof Error ? e.message : String(e)}`,
        },
        warnings: [],
      }))
      .then((outcome) => {
        // Failures are not kept: a storage hiccup must not stick.
        if (outcome.ok) cache.set(key, outcome.value);
        return outcome;
      })
      .finally(() => making.delete(key));
    making.set(key, pending);
  }
  return pending;
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
