/**
 * Which MDF4 channels are time, crank and gearbox: the options' picks (by channel name, or
 * "group/name" when two groups have a channel of that name), else the same recognition as a
 * CSV header (columns.ts resolveColumns, team names first) over the channel names. Time is
 * always the master channel of the crank channel's group: that is the time base its samples
 * were recorded on.
 */
import { recogniseColumn, resolveColumns, type ColumnIssue } from "../columns.ts";
import type { IngestOptions } from "../ingest.ts";
import type { ChannelRole, SignalIssue, SpeedUnit, TimeUnit } from "../types.ts";
import { parseSpeedUnit, parseTimeUnit } from "../units.ts";
import type { Channel, ChannelGroup, DataGroup, MdfModel } from "./structure.ts";

/** One channel of the file with the name the picker and messages show. */
export interface ChannelRef {
  dg: DataGroup;
  group: ChannelGroup;
  channel: Channel;
  /** The channel's name, or "group/name" when another group has a channel of that name. */
  display: string;
  master: boolean;
}

export interface Choice {
  time: ChannelRef;
  crank: ChannelRef;
  gearbox: ChannelRef;
  timeUnit: TimeUnit;
  crankUnit: SpeedUnit;
  gearboxUnit: SpeedUnit;
  warnings: SignalIssue[];
}

const norm = (s: string) => s.trim().toLowerCase().replace(/\s+/g, " ");
const isMaster = (c: Channel) => c.type === 2 || c.type === 3;

/** Every numeric channel of the file, masters included, with its display name. */
export function channelRefs(model: MdfModel): ChannelRef[] {
  const refs: ChannelRef[] = [];
  for (const dg of model.dataGroups)
    for (const group of dg.groups)
      for (const channel of group.channels)
        refs.push({ dg, group, channel, display: channel.name, master: isMaster(channel) });
  const count = new Map<string, number>();
  for (const r of refs) count.set(norm(r.display), (count.get(norm(r.display)) ?? 0) + 1);
  for (const r of refs)
    if ((count.get(norm(r.display)) ?? 0) > 1) r.display = `${r.group.name}/${r.channel.name}`;
  return refs;
}

type Picked = { ok: true; value: Choice } | { ok: false; error: ColumnIssue };

function issue(code: string, message: string, names: string[], extra: Partial<ColumnIssue> = {}) {
  return { ok: false as const, error: { code, message, columns: names, ...extra } };
}

const quote = (names: string[]) =>
  names.length > 12
    ? `${names
        .slice(0, 12)
        .map((n) => `"${n}"`)
        .join(", ")} and ${names.length - 12} more`
    : names.map((n) => `"${n}"`).join(", ");

/** The channel a user's pick names: its display name, "group/name", or a name only one group has. */
function find(refs: ChannelRef[], wanted: string, role: ChannelRole): ChannelRef | Picked {
  const w = norm(wanted);
  const hits = refs.filter(
    (r) => norm(r.display) === w || norm(`${r.group.name}/${r.channel.name}`) === w,
  );
  if (hits.length === 1) return hits[0]!;
  const byName = refs.filter((r) => norm(r.channel.name) === w);
  const names = refs.map((r) => r.display);
  if (byName.length > 1)
    return issue(
      "ambiguous_columns",
      `${byName.length} channels are named "${wanted}" (${quote(byName.map((r) => r.display))}); name the group too, as "group/name"`,
      names,
      { role, candidates: byName.map((r) => r.display) },
    );
  return issue(
    "unknown_column",
    `no channel named "${wanted}" for the ${role} channel; the file has ${quote(names)}`,
    names,
    { role },
  );
}

const LABEL = { crank: "crank-side speed", gearbox: "gearbox-side speed" } as const;
const SENTINEL = "\u0000master";

/** Decides time, crank and gearbox and their units, or says which pick is missing or wrong. */
export function chooseChannels(refs: ChannelRef[], options: IngestOptions): Picked {
  const speeds = refs.filter((r) => !r.master);
  const names = speeds.map((r) => r.display);
  const picked: Partial<Record<"crank" | "gearbox", ChannelRef>> = {};
  for (const role of ["crank", "gearbox"] as const) {
    const wanted = role === "crank" ? options.crankColumn : options.gearboxColumn;
    if (wanted === undefined) continue;
    const hit = find(speeds, wanted, role);
    if ("ok" in hit) return hit;
    picked[role] = hit;
  }
  if (picked.crank && picked.crank === picked.gearbox)
    return issue(
      "ambiguous_columns",
      `channel "${picked.crank.display}" is set for two channels`,
      names,
    );
  // The recognition of a CSV header, with time pinned to a placeholder: MDF4 time is not a
  // choice among channels but the crank group's master.
  const resolved = resolveColumns([SENTINEL, ...names], {
    ...options,
    timeColumn: SENTINEL,
    crankColumn: picked.crank?.display,
    gearboxColumn: picked.gearbox?.display,
    timeUnit: "s",
  });
  if (!resolved.ok) {
    const e = resolved.error;
    const role = e.role === "gearbox" ? "gearbox" : "crank";
    const candidates = (e.candidates ?? []).filter((c) => c !== SENTINEL);
    const message =
      e.code === "missing_channel"
        ? `no ${LABEL[role]} channel recognised among the file's channels (${quote(names)}); choose one`
        : candidates.length > 1
          ? `${candidates.length} channels could be the ${LABEL[role]}: ${quote(candidates)}; choose one`
          : e.message.replace(`"${SENTINEL}", `, "");
    return issue(e.code, message, names, { role, candidates });
  }
  const { map } = resolved;
  const crank = speeds[map.crank - 1]!;
  const gearbox = speeds[map.gearbox - 1]!;
  // A unit the recognition read from the name ("crank [rpm]") or the team's names give, unless
  // it only assumed rpm: the last resort after the file's own unit.
  const assumed = (r: ChannelRef) =>
    resolved.warnings.some((w) => w.code === "unit_assumed" && w.column === r.display);
  const named = {
    crank: assumed(crank) ? undefined : map.crankUnit,
    gearbox: assumed(gearbox) ? undefined : map.gearboxUnit,
  };
  return withTime(refs, crank, gearbox, options, names, named);
}

function withTime(
  refs: ChannelRef[],
  crank: ChannelRef,
  gearbox: ChannelRef,
  options: IngestOptions,
  names: string[],
  named: { crank?: SpeedUnit; gearbox?: SpeedUnit },
): Picked {
  const master = refs.find((r) => r.group === crank.group && r.channel === crank.group.master);
  if (!master || (master.channel.syncType !== 1 && master.channel.syncType !== 0))
    return issue(
      "mdf4_no_time",
      `the group "${crank.group.name}" of channel "${crank.display}" has no time channel (master), so its samples have no times`,
      names,
    );
  if (gearbox.group !== crank.group && !gearbox.group.master)
    return issue(
      "mdf4_no_time",
      `the group "${gearbox.group.name}" of channel "${gearbox.display}" has no time channel (master), so it cannot be aligned with the crank channel`,
      names,
    );
  const t = options.timeColumn;
  if (t !== undefined && norm(t) !== norm(master.display) && norm(t) !== norm(master.channel.name))
    return issue(
      "unknown_column",
      `the time of channel "${crank.display}" is its group's master channel "${master.display}"; "${t}" cannot be its time`,
      names,
      { role: "time" },
    );
  const warnings: SignalIssue[] = [];
  let timeUnit = options.timeUnit ?? parseTimeUnit(master.channel.unit);
  if (!timeUnit && master.channel.unit === "") {
    timeUnit = "s";
    warnings.push({
      code: "unit_assumed",
      message: `no unit on the time channel "${master.display}"; read as seconds (set the time unit if that is wrong)`,
      column: master.display,
    });
  }
  if (!timeUnit)
    return issue(
      "unknown_unit",
      `the time channel "${master.display}" is in "${master.channel.unit}", which is not a time unit Twistlog knows; set the time unit (s or ms)`,
      names,
      { role: "time", column: master.display },
    );
  const speedUnit = (r: ChannelRef, set: SpeedUnit | undefined, role: "crank" | "gearbox") => {
    const unit =
      set ??
      options.unit ??
      parseSpeedUnit(r.channel.unit) ??
      (r.channel.unit ? undefined : named[role]);
    if (unit) return unit;
    const said = r.channel.unit
      ? `is in "${r.channel.unit}", which is not a speed unit Twistlog knows`
      : "has no unit";
    return issue(
      "unknown_unit",
      `the ${LABEL[role]} channel "${r.display}" ${said}; set its unit (rpm, rad/s, deg/s or rev/s)`,
      names,
      { role, column: r.display },
    );
  };
  const crankUnit = speedUnit(crank, options.crankUnit, "crank");
  if (typeof crankUnit !== "string") return crankUnit;
  const gearboxUnit = speedUnit(gearbox, options.gearboxUnit, "gearbox");
  if (typeof gearboxUnit !== "string") return gearboxUnit;
  return {
    ok: true,
    value: { time: master, crank, gearbox, timeUnit, crankUnit, gearboxUnit, warnings },
  };
}

/**
 * Roles for the channel list: the full choice when it can be made; else each speed channel
 * that recognition alone names the only candidate for a role.
 */
export function rolesOf(refs: ChannelRef[], options: IngestOptions): Map<ChannelRef, ChannelRole> {
  const roles = new Map<ChannelRef, ChannelRole>();
  const chosen = chooseChannels(refs, options);
  if (chosen.ok) {
    roles.set(chosen.value.time, "time");
    roles.set(chosen.value.crank, "crank");
    roles.set(chosen.value.gearbox, "gearbox");
    return roles;
  }
  for (const role of ["crank", "gearbox"] as const) {
    const hits = refs.filter((r) => !r.master && recogniseColumn(r.display).role === role);
    if (hits.length === 1) roles.set(hits[0]!, role);
  }
  // Time is always the master of the crank's group (the ingest reads it so), once a crank is known.
  const crank = [...roles].find(([, role]) => role === "crank")?.[0];
  const master = crank && refs.find((r) => r.master && r.group === crank.group);
  if (master) roles.set(master, "time");
  return roles;
}
