/**
 * Targets: a vehicle's programme pass/fail limits (docs/architecture.md §3 "target") and how a drive log's
 * analysis is judged against them. Pure and shared by the server, the forms and the pages; the
 * rules are explained for users in docs/targets.md (a product rule of Twistlog, not a standard).
 *
 * - "isolation": at least `minDb` dB of isolation at the firing order over the engine-speed
 *   range `rpmFrom`–`rpmTo` rpm (both ends included).
 * - "rattle": the gearbox-input angular acceleration at idle at most `maxRadS2` rad/s².
 * - "start-stop" and "twist-margin" (issue 15): the start/stop events' peak amplification at most
 *   `maxDb` dB, and their twist's margin to the damper travel limit at least `minMarginDeg` degrees
 *   (./transient-targets).
 * Every kind may be limited to test conditions and/or gears; empty lists mean every drive log.
 * The margin is positive when the drive log does better than the target, in the target's unit.
 *
 * This module holds the target model and the verdict rules; the form and API input schema is in
 * ./target-schema, the words pages show in ./target-text.
 */
import type { TargetKind } from "./target-kinds";
import { conditionLabels, type LogCondition } from "./drive-log-terms";
import { countText } from "../base/plural";
import { dbText, radS2Text, rpmText } from "./format";
import { gearText, scopeText } from "./target-text";
import type { EventFigure } from "./event-figures";
import { startStopVerdict, twistMarginVerdict } from "./transient-targets";

/** A stored target as the evaluation and the pages see it. */
export interface Target {
  id: number;
  name: string;
  kind: TargetKind;
  rpmFrom: number | null;
  rpmTo: number | null;
  minDb: number | null;
  maxRadS2: number | null;
  /** Start-stop: the largest peak amplification allowed, dB. */
  maxDb: number | null;
  /** Twist-margin: the least margin of the start/stop twist to the travel limit, degrees. */
  minMarginDeg: number | null;
  conditions: LogCondition[];
  gears: number[];
}

export type TargetStatus = "pass" | "fail" | "not-covered" | "not-applicable";

export interface TargetVerdict {
  targetId: number;
  name: string;
  kind: TargetKind;
  status: TargetStatus;
  /**
   * Isolation: least isolation over the range, dB. Rattle: the larger of the two idle figures,
   * rad/s². Start-stop: the largest peak amplification, dB. Twist-margin: travel limit − largest
   * peak-to-peak twist, degrees. Null unless pass or fail.
   */
  value: number | null;
  /** minDb (dB), maxRadS2 (rad/s²), maxDb (dB) or minMarginDeg (°). */
  limit: number;
  /**
   * Positive = better than the target, in `unit`: value − minDb, maxRadS2 − value,
   * maxDb − value, or value − minMarginDeg. Null unless pass or fail.
   */
  margin: number | null;
  unit: "dB" | "rad/s²" | "°";
  /** Where `value` was found: the isolation bin, the mean idle speed, or the event's resonance; rpm. */
  atRpm: number | null;
  /** One plain sentence: what was found, and why when there is no pass or fail. */
  detail: string;
}

/** What the evaluation reads of an analysis (AnalysisResult has all of it). */
export interface TargetEvidence {
  /** Isolation at the firing order per engine-speed bin: rpm, dB, and false when the dB is a lower bound. */
  isolation: readonly { rpm: number; dB: number; aboveNoise: boolean }[];
  /** Width of the engine-speed bins, rpm. */
  binRpm: number;
  /** The rattle check of the idle segments, rad/s²; null when the log has no idle. */
  idle: null | {
    gearboxAngAccelRadS2: number;
    gearboxAngAccelPeakRadS2: number;
    meanRpm?: number;
  };
  /** The engine start and stop events (result.events); null when the result predates them. */
  events: readonly EventFigure[] | null;
  /** The vehicle's damper travel limit (stop to stop), degrees; null when not known. */
  damperTravelLimitDeg: number | null;
}

/** A target as entered in the form or the API, after the schema in ./target-schema. */
export type TargetInput =
  | {
      kind: "isolation";
      name: string;
      rpmFrom: number;
      rpmTo: number;
      minDb: number;
      conditions: LogCondition[];
      gears: number[];
    }
  | { kind: "rattle"; name: string; maxRadS2: number; conditions: LogCondition[]; gears: number[] }
  | { kind: "start-stop"; name: string; maxDb: number; conditions: LogCondition[]; gears: number[] }
  | {
      kind: "twist-margin";
      name: string;
      minMarginDeg: number;
      conditions: LogCondition[];
      gears: number[];
    };

/** Each kind's unit and the field that holds its limit. */
export const TARGET_LIMIT = {
  isolation: { unit: "dB", field: "minDb" },
  rattle: { unit: "rad/s²", field: "maxRadS2" },
  "start-stop": { unit: "dB", field: "maxDb" },
  "twist-margin": { unit: "°", field: "minMarginDeg" },
} as const satisfies Record<TargetKind, { unit: TargetVerdict["unit"]; field: keyof Target }>;

// ---------------------------------------------------------------------------------------------
// Evaluation (product rule, docs/targets.md)

/** Below this share of the range covered by bins, an isolation target gets no pass (docs/targets.md). */
export const MIN_COVERED_SHARE = 0.5;
const EPS = 1e-9;
const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;

/** Null when the target applies to the log (its conditions and gears), else why not. */
export function outOfScope(target: Target, log: { condition: LogCondition; gear: number | null }) {
  if (target.conditions.length && !target.conditions.includes(log.condition))
    return `Applies to ${target.conditions.map((c) => conditionLabels[c]).join(", ")} only; this drive log is ${conditionLabels[log.condition]}.`;
  if (target.gears.length && (log.gear === null || !target.gears.includes(log.gear)))
    return `Applies to ${scopeText({ conditions: [], gears: target.gears })} only; this drive log has ${gearText(log.gear)}.`;
  return null;
}

/**
 * Judges one drive log's analysis against each target, in the order given. Rules (product rule,
 * docs/targets.md):
 *
 * Isolation — the bins whose engine speed lies in [rpmFrom, rpmTo] (ends included):
 * 1. none → "not-covered";
 * 2. any bin above the gearbox noise floor with dB < minDb → "fail", value = the least such dB;
 *    a fail needs no coverage: one measured bin under the limit breaks the target;
 * 3. bins (each ±binRpm/2 wide) covering less than half of the range → "not-covered";
 * 4. a bin below the noise floor measures a lower bound of the isolation: one that meets minDb
 *    passes, one under minDb decides nothing (it cannot fail a target) → "not-covered" naming it;
 * 5. otherwise "pass", value = the least dB over the bins (a lower bound when that bin is one).
 * The range counts as covered partially when its lowest or highest bin lies more than one bin
 * width inside the range's ends; the detail then says "covers only X–Y rpm".
 *
 * Rattle — value = max(firing-order amplitude, time-domain peak) of the idle check, the figure
 * the rattle verdict compares with the vehicle's limit (app/lib/signal/rattle.ts); pass when
 * value ≤ maxRadS2; no idle segment → "not-covered".
 *
 * Conditions and gears that do not match the log → "not-applicable" (a log without a gear never
 * matches a gear-limited target).
 */
export function evaluateTargets(
  targets: readonly Target[],
  log: { condition: LogCondition; gear: number | null },
  result: TargetEvidence,
): TargetVerdict[] {
  return targets.map((t) => {
    const base = {
      targetId: t.id,
      name: t.name,
      kind: t.kind,
      value: null,
      margin: null,
      atRpm: null,
    } as const;
    const { unit, field } = TARGET_LIMIT[t.kind];
    const limit = t[field] ?? 0;
    const scope = outOfScope(t, log);
    if (scope) return { ...base, unit, limit, status: "not-applicable", detail: scope };
    switch (t.kind) {
      case "isolation":
        return isolationVerdict(t, result);
      case "rattle":
        return rattleVerdict(t, result);
      case "start-stop":
        return startStopVerdict(t, result);
      case "twist-margin":
        return twistMarginVerdict(t, result);
    }
  });
}

function isolationVerdict(t: Target, result: TargetEvidence): TargetVerdict {
  const lo = t.rpmFrom ?? 0;
  const hi = t.rpmTo ?? 0;
  const minDb = t.minDb ?? 0;
  const bin = result.binRpm;
  const range = `${Math.round(lo)}–${Math.round(hi)} rpm`;
  const shell = {
    targetId: t.id,
    name: t.name,
    kind: t.kind,
    unit: "dB" as const,
    limit: minDb,
  };
  const none = { value: null, margin: null, atRpm: null };
  const points = result.isolation
    .filter((p) => p.rpm >= lo - EPS && p.rpm <= hi + EPS)
    .slice()
    .sort((a, b) => a.rpm - b.rpm);
  if (points.length === 0) {
    const all = result.isolation.map((p) => p.rpm);
    return {
      ...shell,
      ...none,
      status: "not-covered",
      detail: all.length
        ? `No isolation bins between ${range}; this drive log covers ${Math.round(Math.min(...all))}–${Math.round(Math.max(...all))} rpm.`
        : "This drive log has no isolation bins.",
    };
  }
  const first = points[0]!.rpm;
  const last = points[points.length - 1]!.rpm;
  const partial = first - lo > bin + EPS || hi - last > bin + EPS;
  const coverNote = partial
    ? ` The drive log covers only ${Math.round(first)}–${Math.round(last)} rpm of ${range}.`
    : "";
  const measured = points.filter((p) => p.aboveNoise);
  const misses = measured.filter((p) => p.dB < minDb);
  if (misses.length) {
    const worst = misses.reduce((w, p) => (p.dB < w.dB ? p : w));
    const margin = round(worst.dB - minDb, 2);
    const count =
      misses.length > 1
        ? ` Under the target in ${misses.length} of ${countText(points.length, "bin")}.`
        : "";
    return {
      ...shell,
      status: "fail",
      value: worst.dB,
      margin,
      atRpm: worst.rpm,
      detail: `Least isolation ${dbText(worst.dB)} at ${rpmText(worst.rpm)}, ${dbText(Math.abs(margin))} short of the target.${count}${coverNote}`,
    };
  }
  // Each bin stands for ±bin/2 around its centre; the share of the range those spans cover.
  const covered = points.reduce(
    (s, p) => s + Math.max(0, Math.min(hi, p.rpm + bin / 2) - Math.max(lo, p.rpm - bin / 2)),
    0,
  );
  const share = hi > lo ? Math.min(1, covered / (hi - lo)) : 1;
  if (share < MIN_COVERED_SHARE)
    return {
      ...shell,
      ...none,
      status: "not-covered",
      detail: `Isolation bins cover only ${Math.round(share * 100)} % of ${range} (${Math.round(first)}–${Math.round(last)} rpm); a pass needs at least ${MIN_COVERED_SHARE * 100} %. No bin is under the target.`,
    };
  const undecided = points.filter((p) => !p.aboveNoise && p.dB < minDb);
  if (undecided.length) {
    const low = undecided.reduce((w, p) => (p.dB < w.dB ? p : w));
    const where =
      undecided.length === 1
        ? `at ${rpmText(low.rpm)}`
        : `in ${undecided.length} bins (lowest at ${rpmText(low.rpm)})`;
    return {
      ...shell,
      ...none,
      status: "not-covered",
      detail: `Undecided: ${where} the gearbox signal is within its noise floor, so the isolation there is only known to be at least ${dbText(low.dB)}; a lower bound under the target cannot fail it, nor pass it.${coverNote}`,
    };
  }
  const worst = points.reduce((w, p) => (p.dB < w.dB ? p : w));
  const margin = round(worst.dB - minDb, 2);
  const bound = worst.aboveNoise
    ? ""
    : " (a lower bound: the gearbox signal there is within its noise floor)";
  return {
    ...shell,
    status: "pass",
    value: worst.dB,
    margin,
    atRpm: worst.rpm,
    detail: `Least isolation ${dbText(worst.dB)} at ${rpmText(worst.rpm)}${bound}, ${dbText(margin)} above the target.${coverNote}`,
  };
}

function rattleVerdict(t: Target, result: TargetEvidence): TargetVerdict {
  const max = t.maxRadS2 ?? 0;
  const shell = {
    targetId: t.id,
    name: t.name,
    kind: t.kind,
    unit: "rad/s²" as const,
    limit: max,
  };
  const idle = result.idle;
  if (!idle)
    return {
      ...shell,
      value: null,
      margin: null,
      atRpm: null,
      status: "not-covered",
      detail: "No idle segment in this drive log, so no rattle check.",
    };
  const amp = idle.gearboxAngAccelRadS2;
  const peak = idle.gearboxAngAccelPeakRadS2;
  const value = Math.max(amp, peak);
  const margin = round(max - value, 1);
  const which =
    peak >= amp
      ? `time-domain peak ${radS2Text(peak)} (firing-order amplitude ${radS2Text(amp)})`
      : `firing-order amplitude ${radS2Text(amp)} (time-domain peak ${radS2Text(peak)})`;
  const pass = value <= max;
  return {
    ...shell,
    status: pass ? "pass" : "fail",
    value,
    margin,
    atRpm: idle.meanRpm ?? null,
    detail: `Gearbox-input ${which}: ${radS2Text(Math.abs(margin))} ${pass ? "below" : "over"} the target.`,
  };
}

/** Counts of a drive log's verdicts, for tables. */
export function tally(verdicts: readonly TargetVerdict[]) {
  const n = (s: TargetStatus) => verdicts.filter((v) => v.status === s).length;
  return {
    passed: n("pass"),
    failed: n("fail"),
    notCovered: n("not-covered"),
    notApplicable: n("not-applicable"),
  };
}
