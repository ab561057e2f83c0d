/**
 * The evidence report's words: verdicts, states, dates, settings and figures as the report
 * writes them. Figures use the app's one rounding rule per quantity (domain/format.ts), so the
 * report and the pages agree to the last digit.
 */
import { signoffStateLabels, type ClaimCheck, type ClaimStatus } from "../domain/signoff";
import type { TargetStatus, TargetVerdict } from "../domain/targets";
import { dbText, degreesText, fixed, radS2Text, rpmText } from "../domain/format";
import { conditionLabels, gearLabel } from "../domain/drive-log-terms";
import type { RecordLog, RecordTarget } from "../domain/signoff";
import type { ReportModel } from "./report-model";

export const claimStatusWords: Record<ClaimStatus, string> = {
  pass: "Pass",
  fail: "Fail",
  "not-covered": "Not covered",
};

export const verdictWords: Record<TargetStatus, string> = {
  pass: "Pass",
  fail: "Fail",
  "not-covered": "Not covered",
  "not-applicable": "Does not apply",
};

/** The header's state: the sign-off's in words, or the draft of the vehicle's current state. */
export function stateText(state: ReportModel["state"]): string {
  return state === "current state" ? "Current state (not signed off)" : signoffStateLabels[state];
}

/** A claim's verdict in words, with its deviation when one is recorded. */
export function claimVerdictText(c: Pick<ClaimCheck, "status" | "deviation">): string {
  const words = claimStatusWords[c.status];
  return c.status !== "pass" && c.deviation !== null ? `${words}, deviation accepted` : words;
}

/** A figure in a target's unit: dB and rad/s² by the app's rules, degrees with one decimal. */
export function unitText(x: number | null, unit: TargetVerdict["unit"]): string {
  return unit === "dB" ? dbText(x) : unit === "rad/s²" ? radS2Text(x) : degreesText(x);
}

/** A margin with its sign ("+2.3 dB", "−0.4 dB"): positive is better than the target. */
export function marginText(x: number | null, unit: TargetVerdict["unit"]): string {
  if (x === null || !Number.isFinite(x)) return "—";
  const text = unitText(x, unit);
  return x > 0 && !/^0(\.0+)?(\s|°|$)/.test(text) ? `+${text}` : text;
}

/** What the target asks, in words without signs the font lacks ("at least 12.0 dB"). */
export function limitText(c: Pick<ClaimCheck, "kind" | "limit" | "unit">): string {
  const value = unitText(c.limit, c.unit);
  switch (c.kind) {
    case "isolation":
      return `at least ${value}`;
    case "rattle":
      return `at most ${value}`;
    case "start-stop":
      return `peak amplification at most ${value}`;
    case "twist-margin":
      return `end-stop margin at least ${value}`;
  }
}

/** Where a target applies: its engine-speed range, conditions and gears. */
export function targetScopeText(t: RecordTarget): string {
  const parts: string[] = [];
  if (t.kind === "isolation" && t.rpmFrom !== null && t.rpmTo !== null)
    parts.push(`${fixed(t.rpmFrom, 0)}–${rpmText(t.rpmTo)}`);
  if (t.conditions.length) parts.push(t.conditions.map((c) => conditionLabels[c]).join(", "));
  if (t.gears.length) parts.push(`gear ${t.gears.map((g) => gearLabel(g)).join(", ")}`);
  return parts.length ? parts.join("; ") : "every drive log";
}

/** "2026-11-05" from an ISO time stamp (the date in UTC). */
export function dateText(iso: string | null): string {
  if (!iso) return "—";
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : d.toISOString().slice(0, 10);
}

/** "2026-11-05 14:03 UTC" from an ISO time stamp. */
export function timeText(iso: string | null): string {
  if (!iso) return "—";
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : `${d.toISOString().slice(0, 16).replace("T", " ")} UTC`;
}

/** The first 12 hex digits of a digest, as the footer shows it. */
export const shortHash = (hex: string) => hex.slice(0, 12);

/** "Run-up, gear 3, tested 2026-11-04" */
export function logConditionText(log: RecordLog): string {
  const gear = log.gear === null ? "gear not given" : `gear ${gearLabel(log.gear)}`;
  const tested = log.testDate ? `tested ${dateText(log.testDate)}` : "test date not given";
  return `${conditionLabels[log.condition]}, ${gear}, ${tested}`;
}

/** The analysis settings that decide the figures, in words with units. */
export function settingsText(settings: Record<string, unknown>): string {
  const s = settings;
  const parts: string[] = [];
  const num = (k: string) => (typeof s[k] === "number" ? (s[k] as number) : null);
  if (num("cylinders") !== null)
    parts.push(`${num("cylinders")} cylinders, ${num("stroke") ?? 4}-stroke`);
  if (num("firingOrder") !== null) parts.push(`firing order ${num("firingOrder")}`);
  if (num("revsPerBlock") !== null) parts.push(`${num("revsPerBlock")} revolutions per block`);
  if (num("overlap") !== null) parts.push(`overlap ${fixed(num("overlap")! * 100, 0)} %`);
  if (num("binRpm") !== null) parts.push(`bins of ${rpmText(num("binRpm"))}`);
  if (typeof s.window === "string") parts.push(`window ${s.window}`);
  if (typeof s.detrend === "string") parts.push(`detrend ${s.detrend}`);
  if (num("samplesPerRev") !== null)
    parts.push(`up to ${num("samplesPerRev")} samples per revolution`);
  if (num("rattleLimitRadS2") !== null)
    parts.push(`rattle limit ${radS2Text(num("rattleLimitRadS2"))}`);
  return parts.length ? parts.join("; ") : "not recorded";
}

const KEY_SETTINGS = new Set([
  "cylinders",
  "stroke",
  "firingOrder",
  "revsPerBlock",
  "overlap",
  "binRpm",
  "window",
  "detrend",
  "samplesPerRev",
  "rattleLimitRadS2",
]);

/** The other recorded settings that are plain values, "name = value", sorted by name. */
export function otherSettingsText(settings: Record<string, unknown>): string {
  const parts = Object.entries(settings)
    .filter(([k, v]) => !KEY_SETTINGS.has(k) && v !== null && typeof v !== "object")
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
    .map(([k, v]) => `${k} = ${String(v)}`);
  return parts.length ? parts.join("; ") : "none";
}

/** Bytes in words: "1.4 MB". */
export function sizeText(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${fixed(bytes / 1024, 1)} kB`;
  return `${fixed(bytes / 1024 / 1024, 1)} MB`;
}
