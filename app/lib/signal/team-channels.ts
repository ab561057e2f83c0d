/**
 * A team's own channel names (ColumnOptions.channelNames, a team setting): the role and unit
 * a team gives one of its loggers' names. Matched like the column overrides, ignoring case and
 * extra spaces, so "N_KW " is the team's "n_kw"; a unit in the header ("n_kw [rpm]") does not
 * stop the match.
 */
import { nameWithoutUnit } from "./column-names.ts";
import type { ChannelName, ChannelRole, SpeedUnit, TimeUnit } from "./types.ts";
import { parseSpeedUnit, parseTimeUnit } from "./units.ts";

export interface TeamChannel {
  role: ChannelRole;
  /** The team's unit, split by kind (a speed unit for crank/gearbox, a time unit for time). */
  speedUnit?: SpeedUnit;
  timeUnit?: TimeUnit;
}

const norm = (s: string) => s.trim().toLowerCase().replace(/\s+/g, " ");

/** The team's entry for a header name, or undefined when the team has not named it. */
export function teamChannel(
  header: string,
  names: readonly ChannelName[] | undefined,
): TeamChannel | undefined {
  if (!names || names.length === 0) return undefined;
  const keys = [norm(header), norm(nameWithoutUnit(header))];
  const hit = names.find((n) => keys.includes(norm(n.name)));
  if (!hit) return undefined;
  const unit = hit.unit ?? "";
  if (hit.role === "time") {
    const timeUnit = parseTimeUnit(unit);
    return timeUnit ? { role: "time", timeUnit } : { role: "time" };
  }
  const speedUnit = parseSpeedUnit(unit);
  return speedUnit ? { role: hit.role, speedUnit } : { role: hit.role };
}
