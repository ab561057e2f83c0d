/**
 * The built-in recognition of a header name (columns.ts): common English words for time, the
 * crank side and the gearbox side, and the unit written in the name. Teams add their own
 * names (team-channels.ts), which are applied first.
 */
import type { SpeedUnit, TimeUnit } from "./types.ts";
import { parseSpeedUnit, parseTimeUnit } from "./units.ts";

export type ColumnRole = "time" | "crank" | "gearbox" | "other";

export interface ColumnGuess {
  role: ColumnRole;
  /** Unit written in the name, if any (a speed unit for speed columns, a time unit for time). */
  speedUnit?: SpeedUnit;
  timeUnit?: TimeUnit;
}

const CRANK_WORDS = new Set([
  "crank",
  "crankshaft",
  "engine",
  "primary",
  "flywheel",
  "motor",
  "ring",
]);
const GEARBOX_WORDS = new Set(["gearbox", "transmission", "secondary", "trans", "gbx"]);
const TIME_WORDS = new Set(["time", "t", "timestamp", "elapsed"]);
// Quantities that share role words with the speed channels ("engine torque") but are not speeds.
const NOT_SPEED_WORDS = new Set([
  "torque",
  "temp",
  "temperature",
  "pressure",
  "angle",
  "position",
  "pedal",
  "throttle",
  "load",
  "current",
  "voltage",
  "accel",
  "acceleration",
  "lambda",
  "fuel",
  "power",
  "gear",
  "counter",
]);

/** Lowercase words of a header name: letters and digits, split at everything else. */
function words(name: string): string[] {
  return name
    .toLowerCase()
    .split(/[^a-z0-9]+/)
    .filter((w) => w.length > 0);
}

/** The unit written in a name: "[rpm]", "(deg/s)", "{ms}", or a suffix like "_rad_s", "_ms", " Hz". */
function unitText(name: string): { unit: string; rest: string } | undefined {
  const bracket = /[[({]\s*([^\])}]*)\s*[\])}]\s*$/.exec(name);
  if (bracket) return { unit: bracket[1] ?? "", rest: name.slice(0, bracket.index) };
  const w = name.trim().split(/[\s_]+/);
  if (w.length >= 3) {
    const two = `${w[w.length - 2]}/${w[w.length - 1]}`;
    if (parseSpeedUnit(two)) return { unit: two, rest: w.slice(0, -2).join(" ") };
  }
  if (w.length >= 2) {
    const last = w[w.length - 1] ?? "";
    if (parseSpeedUnit(last) || parseTimeUnit(last))
      return { unit: last, rest: w.slice(0, -1).join(" ") };
  }
  return undefined;
}

/** A name without the unit written in it: "n_kw [rpm]" → "n_kw". */
export function nameWithoutUnit(name: string): string {
  return unitText(name)?.rest ?? name;
}

/**
 * The unit a name states, whatever its role: "n_kw [1/min]" states rpm though the built-in
 * words do not know "n_kw" (the team's name or an explicit column gives it a role).
 */
export function unitOfName(name: string): {
  speedUnit?: SpeedUnit;
  timeUnit?: TimeUnit;
  text?: string;
} {
  const u = unitText(name);
  if (!u || u.unit.trim() === "") return {};
  const speedUnit = parseSpeedUnit(u.unit);
  const timeUnit = parseTimeUnit(u.unit);
  return {
    text: u.unit.trim(),
    ...(speedUnit ? { speedUnit } : {}),
    ...(timeUnit ? { timeUnit } : {}),
  };
}

/** Guess a column's role and unit from its header name alone. */
export function recogniseColumn(name: string): ColumnGuess {
  const u = unitText(name);
  const speedUnit = u ? parseSpeedUnit(u.unit) : undefined;
  const timeUnit = u ? parseTimeUnit(u.unit) : undefined;
  const w = words(u ? u.rest : name);
  const phrase = ` ${w.join(" ")} `;
  const hasUnit = u !== undefined && u.unit.trim() !== "";

  if (w.some((x) => TIME_WORDS.has(x)) && !speedUnit && (timeUnit || !hasUnit)) {
    return timeUnit ? { role: "time", timeUnit } : { role: "time" };
  }
  // A unit that is neither a speed nor empty (Nm, °, %, rad/s²) rules a speed out.
  if (hasUnit && !speedUnit) return { role: "other" };
  const gearboxSide =
    w.some((x) => GEARBOX_WORDS.has(x)) ||
    phrase.includes(" input shaft ") ||
    phrase.includes(" gear box ");
  const crankSide = !gearboxSide && w.some((x) => CRANK_WORDS.has(x));
  if (!gearboxSide && !crankSide) return { role: "other" };
  if (w.some((x) => NOT_SPEED_WORDS.has(x))) return { role: "other" };
  const role: ColumnRole = gearboxSide ? "gearbox" : "crank";
  return speedUnit ? { role, speedUnit } : { role };
}
