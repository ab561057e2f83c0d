/**
 * An MDF4 file → DriveLog: the chosen channels' samples only (choose.ts), read group by group
 * (records.ts), the gearbox channel aligned onto the crank's time base when it was recorded on
 * another (align.ts), in s and rad/s; then finishLog, the last step every format shares.
 */
import { finishLog } from "../ingest-finish.ts";
import type { IngestOptions } from "../ingest.ts";
import { fmt } from "../ingest-scan.ts";
import type { DriveLog, Outcome, SignalIssue, TimeUnit } from "../types.ts";
import { parseTimeUnit, RAD_S_PER_UNIT, S_PER_UNIT } from "../units.ts";
import { firstNotIncreasing, interpolateOnto, Samples, within } from "./align.ts";
import { channelRefs, chooseChannels, type ChannelRef } from "./choose.ts";
import { dataPieces } from "./data.ts";
import type { MdfFile } from "./file.ts";
import { readRecords, type Want } from "./records.ts";
import type { DataGroup, MdfModel } from "./structure.ts";

const fail = (error: SignalIssue, warnings: SignalIssue[]): Outcome<DriveLog> => ({
  ok: false,
  error,
  warnings,
});

/** Records a group can hold: its cycle count, but never more than its data have room for. */
function capacity(dataBytes: number, dg: DataGroup, ref: ChannelRef, model: MdfModel): number {
  const record = Math.max(1, dg.recIdSize + ref.group.dataBytes + ref.group.invalBytes);
  const bound = Math.floor(dataBytes / record);
  return model.unfinished ? bound : Math.min(ref.group.cycles, bound);
}

/** The notes of the structure as at most one warning. */
export function notesWarning(notes: string[]): SignalIssue[] {
  if (notes.length === 0) return [];
  const more = notes.length > 5 ? `; and ${notes.length - 5} more` : "";
  return [{ code: "mdf4_skipped", message: `${notes.slice(0, 5).join("; ")}${more}` }];
}

export async function ingestModel(
  file: MdfFile,
  model: MdfModel,
  options: IngestOptions,
  onProgress?: (fraction: number) => void,
): Promise<Outcome<DriveLog>> {
  const warnings = notesWarning(model.notes);
  const all = channelRefs(model);
  const chosen = chooseChannels(all, options);
  if (!chosen.ok) return fail(chosen.error, warnings);
  const c = chosen.value;
  warnings.push(...c.warnings);
  const gMaster = c.gearbox.group === c.crank.group ? c.time : undefined;
  // Every channel that is read, by the reference it came from.
  const store = new Map<ChannelRef, Samples>();
  const refs = [c.time, c.crank, c.gearbox];
  const gTime =
    gMaster ?? all.find((r) => r.group === c.gearbox.group && r.channel === r.group.master)!;
  if (!gMaster) refs.push(gTime);
  const dgs = [...new Set(refs.map((r) => r.dg))];
  const sizes = new Map<DataGroup, number>();
  for (const dg of dgs)
    sizes.set(dg, (await dataPieces(file, dg.data, `DG block at offset ${dg.offset}`)).total);
  const bytesTotal = [...sizes.values()].reduce((a, b) => a + b, 0);
  let bytesBefore = 0;
  for (const dg of dgs) {
    const wants: Want[] = [];
    for (const r of refs.filter((x) => x.dg === dg)) {
      if (store.has(r)) continue;
      const s = new Samples(capacity(sizes.get(dg) ?? 0, dg, r, model));
      store.set(r, s);
      wants.push({ group: r.group, channel: r.channel, sink: s.append });
    }
    await readRecords(file, dg, wants, (done) =>
      onProgress?.(bytesTotal > 0 ? Math.min(1, (bytesBefore + done) / bytesTotal) : 1),
    );
    bytesBefore += sizes.get(dg) ?? 0;
  }
  const values = (r: ChannelRef) => store.get(r)!.take();
  const toS = (t: Float64Array, unit: TimeUnit) =>
    unit === "s" ? t : t.map((x) => x * S_PER_UNIT[unit]);
  const tC = toS(values(c.time), c.timeUnit);
  const crankRaw = values(c.crank);
  const bad = firstNotIncreasing(tC);
  if (bad >= 0) return fail(notIncreasing(c.time, tC, bad), warnings);
  let from = 0;
  let to = tC.length;
  let gearRaw = values(c.gearbox);
  if (!gMaster) {
    // The gearbox group's master in its own unit when it states one, else as the crank's.
    const tG = toS(
      values(gTime),
      options.timeUnit ?? parseTimeUnit(gTime.channel.unit) ?? c.timeUnit,
    );
    const badG = firstNotIncreasing(tG);
    if (badG >= 0) return fail(notIncreasing(gTime, tG, badG), warnings);
    const same = tG.length === tC.length && tG.every((x, i) => x === tC[i]);
    if (!same) {
      ({ from, to } = within(tC, tG[0] ?? Infinity, tG[tG.length - 1] ?? -Infinity));
      if (to - from < 2)
        return fail(
          {
            code: "mdf4_no_overlap",
            message: `the crank channel "${c.crank.display}" and the gearbox channel "${c.gearbox.display}" were not recorded at the same time`,
          },
          warnings,
        );
      gearRaw = interpolateOnto(tC, from, to, tG, gearRaw);
      warnings.push(alignedWarning(c.crank, c.gearbox, tC, tG));
      // Trimming only the few samples past the slower group's last one is the rule, not news.
      const slowStep = tG.length > 1 ? (tG[tG.length - 1]! - tG[0]!) / (tG.length - 1) : 0;
      if (tC[from]! - tC[0]! > 2 * slowStep || tC[tC.length - 1]! - tC[to - 1]! > 2 * slowStep)
        warnings.push({
          code: "mdf4_trimmed",
          message: `the log is cut to ${fmt(tC[from]!)}–${fmt(tC[to - 1]!)} s, where both speed channels were recorded`,
        });
    }
  }
  const timeS = from === 0 && to === tC.length ? tC : tC.slice(from, to);
  const n = timeS.length;
  const radC = RAD_S_PER_UNIT[c.crankUnit];
  const radG = RAD_S_PER_UNIT[c.gearboxUnit];
  // Scaled in place: these arrays are this ingest's own, and a second copy would double the
  // memory of a long log.
  const crankRadS = n === crankRaw.length ? crankRaw : crankRaw.slice(from, to);
  scaleInPlace(crankRadS, radC);
  const gearboxRadS = scaleInPlace(gearRaw, radG);
  const rowOf = (i: number) => from + i + 1;
  const implausible = checkSpeeds(
    [
      [crankRadS, c.crank],
      [gearboxRadS, c.gearbox],
    ],
    options,
    rowOf,
  );
  if (implausible) return fail(implausible, warnings);
  const metadata = [...model.metadata];
  for (const r of [c.time, c.crank, c.gearbox])
    if (r.channel.comment)
      metadata.push({ key: `comment of ${r.display}`, value: r.channel.comment });
  const log: DriveLog = {
    timeS,
    crankRadS,
    gearboxRadS,
    extra: {},
    sampleRateHz: n > 1 ? (n - 1) / (timeS[n - 1]! - timeS[0]!) : 0,
    source: {
      rows: n,
      delimiter: "",
      decimal: ".",
      timeColumn: c.time.display,
      crankColumn: c.crank.display,
      gearboxColumn: c.gearbox.display,
      timeUnit: c.timeUnit,
      crankUnit: c.crankUnit,
      gearboxUnit: c.gearboxUnit,
      format: "mdf4",
      metadata,
      repairs: [],
    },
  };
  const finished = finishLog(log, rowOf, options);
  return { ...finished, warnings: [...warnings, ...finished.warnings] };
}

function notIncreasing(r: ChannelRef, t: Float64Array, i: number): SignalIssue {
  return notIncreasingAt(r, t[i - 1]!, t[i]!, i);
}

/** The refusal of time `cur` at record index i after `prev` (not greater), as the ingest words it. */
export function notIncreasingAt(r: ChannelRef, prev: number, cur: number, i: number): SignalIssue {
  const what = cur === prev ? "repeats" : "goes backwards";
  return {
    code: "time_not_increasing",
    message: `the time channel "${r.display}" ${what} at record ${i + 1} (${fmt(cur)} s after ${fmt(prev)} s)`,
    row: i + 1,
    column: r.display,
  };
}

function alignedWarning(
  crank: ChannelRef,
  gear: ChannelRef,
  tC: Float64Array,
  tG: Float64Array,
): SignalIssue {
  const rate = (t: Float64Array) =>
    t.length > 1 ? (t.length - 1) / (t[t.length - 1]! - t[0]!) : 0;
  const fc = rate(tC);
  const fg = rate(tG);
  const why =
    fg < fc
      ? `its accuracy falls with frequency: about 0.1 dB low at ${fmt(0.06 * fg)} Hz, 1.8 dB at ${fmt(fg / 4)} Hz`
      : `it is not low-pass filtered first, so content above ${fmt(fc / 2)} Hz can alias`;
  return {
    code: "mdf4_rates_aligned",
    message: `the gearbox channel "${gear.display}" (${fmt(fg)} Hz, group "${gear.group.name}") was interpolated linearly onto the times of the crank channel "${crank.display}" (${fmt(fc)} Hz, group "${crank.group.name}"); ${why}`,
  };
}

/** The first speed outside the plausible range, as the CSV row check words it. */
export function checkSpeeds(
  channels: [Float64Array, ChannelRef][],
  o: IngestOptions,
  rowOf: (i: number) => number,
): SignalIssue | undefined {
  const lo = ((o.minRpm ?? -20) * 2 * Math.PI) / 60;
  const hi = ((o.maxRpm ?? 12000) * 2 * Math.PI) / 60;
  for (const [v, r] of channels) {
    const i = firstOutside(v, lo, hi);
    if (i < 0) continue;
    const rpm = (v[i]! * 60) / (2 * Math.PI);
    const why = rpm < 0 ? "negative" : `above ${o.maxRpm ?? 12000} rpm`;
    return {
      code: "implausible_speed",
      message: `record ${rowOf(i)}, channel "${r.display}": speed ${fmt(rpm)} rpm is implausible (${why})`,
      row: rowOf(i),
      column: r.display,
    };
  }
  return undefined;
}

// Small loops of their own: V8 optimises a short function over a long array at once, where the
// same loop inside a long function runs unoptimised for a while (see ingest-checks.ts).

/** Index of the first value outside [lo, hi] (NaN is an invalid sample, left to the repairs), or −1. */
export function firstOutside(v: Float64Array, lo: number, hi: number): number {
  for (let i = 0; i < v.length; i++) {
    const x = v[i]!;
    if ((x < lo || x > hi) && !Number.isNaN(x)) return i;
  }
  return -1;
}

function scaleInPlace(v: Float64Array, k: number): Float64Array {
  if (k !== 1) for (let i = 0; i < v.length; i++) v[i]! *= k;
  return v;
}
