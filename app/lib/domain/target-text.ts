/**
 * Targets in words, as the pages show them: status labels, limits, scopes and margins. The
 * rounding rules of every figure are in ./format (one per quantity).
 */
import { conditionLabels } from "./drive-log-terms";
import { plural } from "../base/plural";
import { dbChangeText, dbText, degreesText, radS2Text, rpmRangeText } from "./format";
import type { Target, TargetInput, TargetStatus, TargetVerdict } from "./targets";

/** A verdict's status in words, as pages show it. */
export const TARGET_STATUS_LABELS: Record<TargetStatus, string> = {
  pass: "pass",
  fail: "fail",
  "not-covered": "not covered",
  "not-applicable": "does not apply",
};

/** A gear as the target form and scopes write it: "R" for reverse, "N" for neutral, else its number. */
export function gearCode(g: number): string {
  return g === -1 ? "R" : g === 0 ? "N" : String(g);
}

export function gearText(g: number | null): string {
  return g === null ? "no gear given" : g === -1 ? "reverse" : g === 0 ? "neutral" : `gear ${g}`;
}
/** A margin with its sign: "+2.3 dB", "−12.4 rad/s²". */
export function marginText(v: Pick<TargetVerdict, "margin" | "unit">): string {
  if (v.margin === null) return "";
  if (v.unit === "dB") return dbChangeText(v.margin);
  const size = v.unit === "°" ? degreesText(Math.abs(v.margin)) : radS2Text(Math.abs(v.margin));
  return `${v.margin > 0 ? "+" : v.margin < 0 ? "−" : "±"}${size}`;
}

/** "at least 10.0 dB over 1000–3000 rpm" / "at most 400 rad/s² at idle" / …, for every kind. */
export function limitText(t: Target | TargetInput): string {
  switch (t.kind) {
    case "isolation":
      return `at least ${dbText(t.minDb!)} at the firing order over ${rpmRangeText(t.rpmFrom, t.rpmTo)}`;
    case "rattle":
      return `gearbox-input angular acceleration at idle at most ${radS2Text(t.maxRadS2!)}`;
    case "start-stop":
      return `peak amplification at engine start and stop at most ${dbText(t.maxDb!)}`;
    case "twist-margin":
      return `start/stop twist at least ${degreesText(t.minMarginDeg!)} short of the damper travel limit`;
  }
}

/** "Every drive log", or "Run-up, Coast-down; gears 2, 3". */
export function scopeText(t: Pick<Target, "conditions" | "gears">): string {
  const parts: string[] = [];
  if (t.conditions.length) parts.push(t.conditions.map((c) => conditionLabels[c]).join(", "));
  if (t.gears.length)
    parts.push(`${plural(t.gears.length, "gear")} ${t.gears.map(gearCode).join(", ")}`);
  return parts.length ? parts.join("; ") : "Every drive log";
}
