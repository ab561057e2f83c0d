/**
 * The channel list of an MDF4 file (the picker's and `--list-channels`' source): every numeric
 * channel, masters included (so the picker can show each group's time base), with its unit,
 * group, its group's sampling rate, sample count, range after conversion and recognised role.
 * One pass over each data group's records; only running figures are kept, never the samples.
 */
import type { IngestOptions } from "../ingest.ts";
import type { ChannelInfo } from "../types.ts";
import { S_PER_UNIT } from "../units.ts";
import { parseTimeUnit } from "../units.ts";
import { channelRefs, rolesOf, type ChannelRef } from "./choose.ts";
import type { MdfFile } from "./file.ts";
import { readRecords, type Want } from "./records.ts";
import type { MdfModel } from "./structure.ts";

interface Running {
  min: number;
  max: number;
  first: number;
  last: number;
  count: number;
}

export async function listModel(
  file: MdfFile,
  model: MdfModel,
  options: IngestOptions,
): Promise<ChannelInfo[]> {
  const refs = channelRefs(model);
  const stats = new Map<ChannelRef, Running>();
  for (const dg of model.dataGroups) {
    const wants: Want[] = [];
    for (const r of refs.filter((x) => x.dg === dg)) {
      const s: Running = { min: Infinity, max: -Infinity, first: NaN, last: NaN, count: 0 };
      stats.set(r, s);
      wants.push({
        group: r.group,
        channel: r.channel,
        sink: (values, n) => {
          if (n === 0) return;
          if (s.count === 0) s.first = values[0]!;
          s.last = values[n - 1]!;
          s.count += n;
          let { min, max } = s;
          for (let i = 0; i < n; i++) {
            const v = values[i]!;
            if (v < min) min = v;
            if (v > max) max = v;
          }
          s.min = min;
          s.max = max;
        },
      });
    }
    if (wants.length > 0) await readRecords(file, dg, wants);
  }
  const roles = rolesOf(refs, options);
  return refs.map((r) => {
    const s = stats.get(r)!;
    const m = r.group.master ? refs.find((x) => x.channel === r.group.master) : undefined;
    const ms = m ? stats.get(m) : undefined;
    const scale = m ? S_PER_UNIT[parseTimeUnit(m.channel.unit) ?? "s"] : 1;
    const span = ms ? (ms.last - ms.first) * scale : NaN;
    const rate = ms && ms.count > 1 && span > 0 ? (ms.count - 1) / span : null;
    return {
      name: r.display,
      unit: r.channel.unit || null,
      group: r.group.name,
      sampleRateHz: rate,
      samples: s.count,
      min: Number.isFinite(s.min) ? s.min : null,
      max: Number.isFinite(s.max) ? s.max : null,
      role: roles.get(r) ?? null,
    };
  });
}
