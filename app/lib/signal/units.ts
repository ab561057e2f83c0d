/**
 * Unit conversion for drive-log channels: angular velocity to rad/s, time to s.
 *
 * Definitions (SI Brochure, 9th ed., table 4 and §2.3.4: the radian is 1, a revolution is 2π rad,
 * a degree is π/180 rad, a minute is 60 s):
 *   1 rpm   = 2π/60 rad/s
 *   1 deg/s = π/180 rad/s
 *   1 rev/s = 2π rad/s (a rotation frequency in Hz is the same quantity)
 *   1 ms    = 1e-3 s
 */
import type { SpeedUnit, TimeUnit } from "./types.ts";

/** Multiply a value in the given unit by this to get rad/s. */
export const RAD_S_PER_UNIT: Readonly<Record<SpeedUnit, number>> = {
  rpm: (2 * Math.PI) / 60,
  "rad/s": 1,
  "deg/s": Math.PI / 180,
  "rev/s": 2 * Math.PI,
};

/** Multiply a value in the given unit by this to get s. */
export const S_PER_UNIT: Readonly<Record<TimeUnit, number>> = { s: 1, ms: 1e-3 };

export const SPEED_UNITS: readonly SpeedUnit[] = ["rpm", "rad/s", "deg/s", "rev/s"];
export const TIME_UNITS: readonly TimeUnit[] = ["s", "ms"];

/** Angular velocity `value` in `unit` → rad/s. */
export function toRadS(value: number, unit: SpeedUnit): number {
  return value * RAD_S_PER_UNIT[unit];
}

/** Angular velocity in rad/s → `unit`. */
export function fromRadS(radS: number, unit: SpeedUnit): number {
  return radS / RAD_S_PER_UNIT[unit];
}

/** Engine speed in rad/s → rpm. */
export function radSToRpm(radS: number): number {
  return radS / RAD_S_PER_UNIT.rpm;
}

/**
 * A unit cell as loggers write it, without its brackets: "[1/min]" → "1/min", "(s)" → "s".
 * "[-]", "-" and "[]" mean "no unit" and give "".
 */
export function unitCellText(text: string): string {
  const t = text.trim();
  const inner = /^[[({]\s*(.*?)\s*[\])}]$/.exec(t);
  const bare = inner ? (inner[1] ?? "") : t;
  return bare === "-" ? "" : bare;
}

/**
 * Read a speed unit as people write it ("rpm", "1/min", "U/min", "rad/s", "rad_s", "°/s",
 * "deg/s", "Hz", "rev/s", "rps"), in brackets or not ("[1/min]"). Returns undefined when the
 * text is not a speed unit ("[-]" is no unit).
 */
export function parseSpeedUnit(text: string): SpeedUnit | undefined {
  const t = unitCellText(text)
    .toLowerCase()
    .replace(/\s+/g, "")
    .replace(/_/g, "/")
    .replace(/⁻¹/g, "^-1");
  if (
    t === "rpm" ||
    t === "1/min" ||
    t === "min^-1" ||
    t === "u/min" ||
    t === "r/min" ||
    t === "rev/min"
  )
    return "rpm";
  if (t === "rad/s" || t === "rads" || t === "rad/sec" || t === "s^-1rad") return "rad/s";
  if (t === "deg/s" || t === "°/s" || t === "degs" || t === "deg/sec" || t === "dps")
    return "deg/s";
  if (t === "rev/s" || t === "hz" || t === "rps" || t === "r/s") return "rev/s";
  return undefined;
}

/** Read a time unit ("s", "sec", "ms", "msec", also "[s]"). Undefined when not a time unit. */
export function parseTimeUnit(text: string): TimeUnit | undefined {
  const t = unitCellText(text).toLowerCase();
  if (t === "s" || t === "sec" || t === "secs" || t === "second" || t === "seconds") return "s";
  if (t === "ms" || t === "msec" || t === "millisecond" || t === "milliseconds") return "ms";
  return undefined;
}
