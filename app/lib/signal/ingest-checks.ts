/**
 * The checks of an ingested drive log that need the whole log: sampling intervals and gaps
 * (strict; otherwise ingest-repairs.ts), length, sampling rate against the top order and
 * clipping. finishLog (ingest-finish.ts) runs them after the last row. Units: s, rad/s, rad.
 */
import { fmt } from "./ingest-scan.ts";
import type { DriveLog, SignalIssue } from "./types.ts";
import { S_PER_UNIT } from "./units.ts";
import { countText, plural } from "../base/plural.ts";
/** Limits for the checks that need the whole log (sampling, length, clipping). */
export interface CheckOptions {
  /**
   * Allowed deviation of a sampling interval from the nominal one, as a fraction (default 0.1
   * when strict; 0.25 otherwise, where deviations over 1 % are resampled, ingest-repairs.ts).
   */
  samplingTolerance?: number;
  /** An interval longer than this many nominal intervals is a gap (default 1.5). */
  gapFactor?: number;
  /** Highest order the analysis will look at, for the sampling-rate warning (default 6). */
  topOrder?: number;
  /** Logs shorter than this in s get a warning (default 2). */
  minDurationS?: number;
  /** Logs with fewer crank revolutions get a warning (default 20). */
  minRevs?: number;
  /** This many equal samples at a channel's maximum count as clipped (default 10). */
  clipRunSamples?: number;
}

/** Nominal sampling interval in s: the median of up to 4001 intervals spread over the log. */
export function nominalInterval(timeS: Float64Array): number {
  return nominalIntervalOf(timeS.length, (i) => timeS[i]! - timeS[i - 1]!);
}

/** nominalInterval of a log of `length` samples whose interval before sample i is interval(i). */
export function nominalIntervalOf(length: number, interval: (i: number) => number): number {
  const n = length - 1;
  const step = Math.max(1, Math.floor(n / 4001));
  const d: number[] = [];
  for (let i = 1; i <= n; i += step) d.push(interval(i));
  d.sort((a, b) => a - b);
  return d[Math.floor(d.length / 2)] ?? 0;
}

/** Running figures over the log, gathered piece by piece (see logStats). */
export interface Stats {
  /** Crank angle in rad; NaN when a crank value is not finite (a dropout). */
  revRad: number;
  /** Sum of the gearbox values: not finite exactly when one of them is not (a dropout). */
  sumG: number;
  maxC: number;
  minC: number;
  maxG: number;
  minG: number;
  minDt: number;
  maxDt: number;
}

/** Fold samples [from, to) (from ≥ 1) into st. Units: s, rad/s, rad. */
export function statsPiece(
  t: Float64Array,
  c: Float64Array,
  g: Float64Array,
  from: number,
  to: number,
  st: Stats,
): void {
  let { revRad, sumG, maxC, minC, maxG, minG, minDt, maxDt } = st;
  let tPrev = t[from - 1]!,
    cPrev = c[from - 1]!;
  for (let i = from; i < to; i++) {
    const ti = t[i]!,
      ci = c[i]!,
      gi = g[i]!;
    const dt = ti - tPrev;
    if (dt < minDt) minDt = dt;
    if (dt > maxDt) maxDt = dt;
    revRad += (ci + cPrev) * 0.5 * dt;
    sumG += gi; // one add: the cheap way to learn whether any gearbox value is NaN or infinite
    if (ci > maxC) maxC = ci;
    if (ci < minC) minC = ci;
    if (gi > maxG) maxG = gi;
    if (gi < minG) minG = gi;
    tPrev = ti;
    cPrev = ci;
  }
  Object.assign(st, { revRad, sumG, maxC, minC, maxG, minG, minDt, maxDt });
}

/** The stats of the first sample (crank c, gearbox g), or of no sample when c is undefined. */
export function startStats(c: number | undefined, g: number): Stats {
  if (c === undefined)
    return {
      revRad: 0,
      sumG: 0,
      maxC: -Infinity,
      minC: Infinity,
      maxG: -Infinity,
      minG: Infinity,
      minDt: Infinity,
      maxDt: -Infinity,
    };
  // revRad is NaN when the first crank value is; sumG when the first gearbox value is.
  return {
    revRad: c * 0,
    sumG: g,
    maxC: c,
    minC: c,
    maxG: g,
    minG: g,
    minDt: Infinity,
    maxDt: -Infinity,
  };
}

/**
 * One pass for sampling extremes, revolutions and channel extremes. Run in pieces of 16 k
 * samples because a single call with a 3 M-sample loop runs long before V8 optimises it
 * (measured: ~50 ms as one loop, ~25 ms in pieces, on the bench log).
 */
export function logStats(log: DriveLog): Stats {
  return columnStats(log.timeS, log.crankRadS, log.gearboxRadS);
}

/** logStats of the columns t, c, g (of one length). */
export function columnStats(t: Float64Array, c: Float64Array, g: Float64Array): Stats {
  const n = t.length;
  const st = startStats(n > 0 ? c[0]! : undefined, g[0]!);
  for (let s = 1; s < n; s += 16384) statsPiece(t, c, g, s, Math.min(n, s + 16384), st);
  return st;
}

/**
 * The stats of two consecutive stretches from the stats of each (a's last sample at time t0 with
 * crank value c0, b's first at t1 with c1): the step between them folded in as statsPiece folds
 * it. Everything but revRad is what one pass gives; revRad, a sum grouped differently, can
 * differ from it in the last bits (it only decides the short-log warning). Undefined when either
 * stretch holds a value that is not finite (a dropout: one pass over the log decides then).
 */
export function joinStats(
  a: Stats,
  b: Stats,
  t0: number,
  c0: number,
  t1: number,
  c1: number,
): Stats | undefined {
  if (!allFinite(a) || !allFinite(b)) return undefined;
  const dt = t1 - t0;
  const hi = (x: number, y: number) => (y > x ? y : x);
  const lo = (x: number, y: number) => (y < x ? y : x);
  return {
    revRad: a.revRad + (c1 + c0) * 0.5 * dt + b.revRad,
    sumG: a.sumG + b.sumG,
    maxC: hi(a.maxC, b.maxC),
    minC: lo(a.minC, b.minC),
    maxG: hi(a.maxG, b.maxG),
    minG: lo(a.minG, b.minG),
    minDt: lo(lo(a.minDt, dt), b.minDt),
    maxDt: hi(hi(a.maxDt, dt), b.maxDt),
  };
}

/** Index where `values` first stays equal to `max` for `need` samples in a row, or −1. */
function firstRunAt(values: Float64Array, max: number, need: number): number {
  let run = 0;
  for (let i = 0; i < values.length; i++) {
    run = values[i] === max ? run + 1 : 0;
    if (run === need) return i - need + 1;
  }
  return -1;
}

/** True when every crank and gearbox value is finite (no dropout), read from the stats pass. */
export function allFinite(st: Stats): boolean {
  return Number.isFinite(st.revRad) && Number.isFinite(st.sumG);
}

/**
 * The strict refusal of a log with a dropout (an MDF4 channel can hold NaN; a CSV refuses it
 * row by row): names the first non-finite value as the row checks do.
 */
export function firstNonFinite(log: DriveLog, rowOf: (i: number) => number): SignalIssue {
  const { crankRadS: c, gearboxRadS: g, source } = log;
  let i = 0;
  while (i < c.length && Number.isFinite(c[i]!) && Number.isFinite(g[i]!)) i++;
  const crankBad = !Number.isFinite(c[i] ?? 0);
  const column = crankBad ? source.crankColumn : source.gearboxColumn;
  const what = crankBad ? "crank speed" : "gearbox speed";
  const r = rowOf(i);
  const message = `row ${r}, column "${column}": the ${what} is not a finite number`;
  return { code: "non_finite", message, row: r, column };
}

/**
 * Whether the strict sampling check finds a problem in a log of n samples with nominal
 * interval `nom`: decided by the interval extremes of the stats pass alone.
 */
export function samplingOff(n: number, nom: number, o: CheckOptions, st: Stats): boolean {
  const tol = (o.samplingTolerance ?? 0.1) * nom;
  return n >= 3 && (st.maxDt - nom > tol || nom - st.minDt > tol);
}

/** The strict sampling check: the first gap, or every interval off the nominal one, is an error. */
export function samplingProblem(
  log: DriveLog,
  rowOf: (i: number) => number,
  o: CheckOptions,
  st: Stats,
): SignalIssue | undefined {
  const { timeS } = log;
  const n = timeS.length;
  const col = log.source.timeColumn;
  const u = log.source.timeUnit;
  const inFile = (s: number) => `${fmt(s / S_PER_UNIT[u])} ${u}`;
  const nom = n >= 3 ? nominalInterval(timeS) : 0;
  const tol = (o.samplingTolerance ?? 0.1) * nom;
  const gap = (o.gapFactor ?? 1.5) * nom;
  // The row-by-row search only runs when the extremes show that something is off.
  if (samplingOff(n, nom, o, st)) {
    const irregular: number[] = [];
    let count = 0;
    for (let i = 1; i < n; i++) {
      const dt = timeS[i]! - timeS[i - 1]!;
      if (dt > gap) {
        const r = rowOf(i);
        const message = `gap in the time at row ${r}: ${inFile(timeS[i - 1]!)} to ${inFile(timeS[i]!)}, the sampling interval is ${inFile(nom)}`;
        return { code: "time_gap", message, row: r, column: col };
      }
      if (dt - nom > tol || nom - dt > tol) {
        count++;
        if (irregular.length < 5) irregular.push(rowOf(i));
      }
    }
    const rows =
      `${plural(count, "row")} ` + irregular.join(", ") + (count > irregular.length ? ", …" : "");
    const pct = Math.round((o.samplingTolerance ?? 0.1) * 100);
    const message = `sampling is irregular at ${countText(count, "row")} (${rows}): intervals differ from ${inFile(nom)} by more than ${pct} %`;
    return { code: "irregular_sampling", message, row: irregular[0] ?? 0, column: col };
  }
  return undefined;
}

/** What contentWarnings needs of a log besides the stats pass (a spooled log has no arrays). */
export interface LogFacts {
  n: number;
  durationS: number;
  sampleRateHz: number;
  crankColumn: string;
  gearboxColumn: string;
  /** Index where the crank (0) or gearbox (1) values first stay at `max` for `need` samples, or −1. */
  runAt(channel: 0 | 1, max: number, need: number): number;
}

/** Length, sampling rate against the top order, and clipping: warnings only. */
export function contentWarnings(
  log: DriveLog,
  rowOf: (i: number) => number,
  o: CheckOptions,
  st: Stats,
): SignalIssue[] {
  const { timeS } = log;
  const n = timeS.length;
  const facts: LogFacts = {
    n,
    durationS: n > 1 ? timeS[n - 1]! - timeS[0]! : 0,
    sampleRateHz: log.sampleRateHz,
    crankColumn: log.source.crankColumn,
    gearboxColumn: log.source.gearboxColumn,
    runAt: (ch, max, need) => firstRunAt(ch === 0 ? log.crankRadS : log.gearboxRadS, max, need),
  };
  return factWarnings(facts, rowOf, o, st);
}

/** contentWarnings from the facts of a log (LogFacts) and its stats pass. */
export function factWarnings(
  f: LogFacts,
  rowOf: (i: number) => number,
  o: CheckOptions,
  st: Stats,
): SignalIssue[] {
  const warnings: SignalIssue[] = [];
  const { n, durationS } = f;
  const revs = st.revRad / (2 * Math.PI);
  const minS = o.minDurationS ?? 2;
  const minRevs = o.minRevs ?? 20;
  if (durationS < minS || revs < minRevs) {
    const message = `the log is short (${fmt(durationS)} s, ${Math.round(revs)} crank revolutions); results need at least ${minS} s and ${minRevs} revolutions to be reliable`;
    warnings.push({ code: "short_log", message });
  }
  const topOrder = o.topOrder ?? 6;
  // Sampling theorem: order q at shaft frequency f needs a sampling rate above 2·q·f.
  const needHz = (2 * topOrder * st.maxC) / (2 * Math.PI);
  if (n > 1 && f.sampleRateHz < needHz) {
    const rpm = Math.round((st.maxC * 60) / (2 * Math.PI));
    const message = `the sampling rate ${fmt(f.sampleRateHz)} Hz is too low for order ${topOrder} at ${rpm} rpm (needs more than ${Math.ceil(needHz)} Hz)`;
    warnings.push({ code: "low_sample_rate", message });
  }
  const need = o.clipRunSamples ?? 10;
  const channels = [
    [0, f.crankColumn, st.maxC, st.minC],
    [1, f.gearboxColumn, st.maxG, st.minG],
  ] as const;
  for (const [ch, name, max, min] of channels) {
    if (!(max > min) || max <= 0) continue;
    const at = f.runAt(ch, max, need);
    if (at < 0) continue;
    const r = rowOf(at);
    const message = `column "${name}" stays at its maximum for ${need} or more samples from row ${r}; the sensor or logger may be clipping`;
    warnings.push({ code: "clipped_values", message, row: r, column: name });
  }
  return warnings;
}
