import { parseSpeedUnit, parseTimeUnit } from "../signal/units.ts";
import type { ChannelInfo } from "../signal/types.ts";

/**
 * True when a file holds more candidates than the three roles need: more than two speed
 * channels (recognised as crank or gearbox, or in a speed unit) or more than one time channel
 * (recognised, or in s or ms). A gear or temperature column is no candidate, so a plain
 * three-speed-and-gear log is not offered a choice it does not need. Shared by the page and its
 * action, so what is offered is exactly what may be posted.
 */
export function moreCandidatesThanRoles(channels: readonly ChannelInfo[]): boolean {
  const speeds = channels.filter(
    (c) => c.role === "crank" || c.role === "gearbox" || (!!c.unit && !!parseSpeedUnit(c.unit)),
  );
  const times = channels.filter((c) => c.role === "time" || (!!c.unit && !!parseTimeUnit(c.unit)));
  return speeds.length > 2 || times.length > 1;
}
