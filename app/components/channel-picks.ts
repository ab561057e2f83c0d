import type { AppliedMapping } from "~/lib/domain/drive-log-terms";
import type { ChannelInfo, ChannelRole } from "~/lib/signal/types";

/** The channel chooser's choice: a channel name per role ("" lets the file's names decide). */
export type Picks = Record<ChannelRole, string>;

/**
 * What the chooser preselects: per role, the channel the last analysis used when the file
 * still has it, else the channel recognised for that role, else "" (recognise).
 */
export function initialPicks(channels: ChannelInfo[], applied: AppliedMapping | null): Picks {
  const m = applied?.mapping ?? {};
  const has = (n: string | undefined) => (n && channels.some((c) => c.name === n) ? n : undefined);
  const byRole = (r: ChannelRole) => channels.find((c) => c.role === r)?.name ?? "";
  return {
    time: has(m.timeColumn) ?? byRole("time"),
    crank: has(m.crankColumn) ?? byRole("crank"),
    gearbox: has(m.gearboxColumn) ?? byRole("gearbox"),
  };
}
