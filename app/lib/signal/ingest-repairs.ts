/**
 * The repairs of a freshly read log when it is not read strictly (finishLog; the rules in
 * docs/signal-ingest.md, "Repairs and sections"):
 * - a dropout (NaN or ±∞ in crank or gearbox) and a run of missing rows (an interval over
 *   gapFactor × the nominal one) are filled by linear interpolation in time when the hole holds
 *   at most `limit` samples (default 10 ms or 20 samples, whichever is fewer); a longer hole
 *   splits the log into sections, and the samples of a long dropout are left out;
 * - intervals off the nominal one by more than 1 % and by more than the step the times are
 *   written in (rounding, timeQuantum; up to 5 %), and up to the tolerance (default 25 %), are
 *   jitter: the section is resampled onto a uniform grid. Farther off, and not a gap, the log
 *   is refused as irregular_sampling.
 * Nothing is allocated for a log with nothing to repair; dropouts alone are filled in place.
 * Every repair becomes a LogRepair (log.source.repairs) and a warning in one sentence.
 */
import { countText, plural } from "../base/plural.ts";
import { allFinite, nominalInterval, type CheckOptions, type Stats } from "./ingest-checks.ts";
import { applyPlan, fillLinear, type SectionPlan } from "./ingest-regrid.ts";
import { fmt } from "./ingest-scan.ts";
import type { DriveLog, LogRepair, SignalIssue } from "./types.ts";

export interface RepairOptions extends CheckOptions {
  /** Longest hole filled, s (default 0.01). */
  repairMaxS?: number;
  /** Longest hole filled, samples (default 20); the fewer of the two applies. */
  repairMaxSamples?: number;
}

/** Intervals off the nominal one by at most this fraction are taken as written (rounding). */
export const JITTER_FLOOR = 0.01;
/** Largest step of the written times, as a fraction of the interval, still read as rounding. */
const ROUNDING_MAX = 0.05;
/** Row ranges kept per repair (types.ts LogRepair.rows). */
const MAX_RANGES = 50;
/** Splits named one by one; the rest are summed up in one more warning. */
const MAX_SPLIT_WARNINGS = 10;

/**
 * The step the times are written in, s: the largest 10⁻ᵈ (d = 0 … 9) of which every one of the
 * first 200 times (from the first) is a whole multiple, or 0. A time written rounded to that step
 * makes an interval differ by up to one step; such a log is read as written, not resampled
 * (1500 Hz written to 10 µs: intervals of 660 and 670 µs, 1.5 % off).
 */
export function timeQuantum(t: Float64Array): number {
  const m = Math.min(t.length, 200);
  for (let d = 0; d <= 9; d++) {
    const f = 10 ** d;
    let whole = true;
    for (let i = 1; i < m && whole; i++) {
      const x = (t[i]! - t[0]!) * f;
      whole = Math.abs(x - Math.round(x)) < 1e-6 * Math.max(1, Math.abs(x)) + 1e-9;
    }
    if (whole) return 1 / f;
  }
  return 0;
}

const sec = (x: number) => `${fmt(Math.round(x * 1e5) / 1e5)} s`;
/** An interval in ms to 4 significant digits. */
const ms = (x: number) => `${fmt(Number((x * 1000).toPrecision(4)))} ms`;
const rowSpan = (a: number, b: number) => (a === b ? `row ${a}` : `rows ${a}–${b}`);

/** One kind of repair: how many samples, where (sample-index ranges), and when. */
class Tally {
  count = 0;
  places = 0;
  idx: { from: number; to: number }[] = [];
  fromS = Infinity;
  toS = -Infinity;
  /** Ranges past MAX_RANGES were counted but not listed. */
  truncated = false;
  add(count: number, fromI: number, toI: number, fromS: number, toS: number): void {
    this.count += count;
    this.places++;
    const last = this.idx[this.idx.length - 1];
    if (last && fromI <= last.to + 1) last.to = Math.max(last.to, toI);
    else if (this.idx.length < MAX_RANGES) this.idx.push({ from: fromI, to: toI });
    else this.truncated = true;
    this.fromS = Math.min(this.fromS, fromS);
    this.toS = Math.max(this.toS, toS);
  }
  /** The repair record; `what` is the message before the parenthesis, `how` after it. */
  record(code: string, rowOf: (i: number) => number, what: string, how: string): LogRepair {
    const rows = this.idx.map((r) => ({ from: rowOf(r.from), to: rowOf(r.to) }));
    const listed = rows
      .slice(0, 5)
      .map((r) => (r.from === r.to ? `${r.from}` : `${r.from}–${r.to}`))
      .join(", ");
    const single = rows.length === 1 && rows[0]!.from === rows[0]!.to;
    const more = rows.length > 5 || this.truncated ? ", …" : "";
    const where = `${single ? "row" : "rows"} ${listed}${more}; ${this.fromS === this.toS ? `at ${sec(this.fromS)}` : `${sec(this.fromS)} to ${sec(this.toS)}`}`;
    const message = `${what} (${where}) ${how}`;
    return { code, message, count: this.count, rows, fromS: this.fromS, toS: this.toS };
  }
}

export interface Repaired {
  log: DriveLog;
  rowOf: (i: number) => number;
  warnings: SignalIssue[];
  error?: SignalIssue;
}

/**
 * Deviation from the nominal interval `nom` below which an interval is taken as written, s.
 * Rounding is not jitter: 1 % of the interval, or the step the times are written in up to 5 %
 * (a coarser step is resampled: it cannot be told from jitter, and resampling it is harmless).
 */
export function jitterFloor(n: number, nom: number, quantum: number): number {
  const q = n >= 3 ? Math.min(quantum * (1 + 1e-6), ROUNDING_MAX * nom) : 0;
  return Math.max(JITTER_FLOOR * nom, q);
}

/** True when a log of n samples (stats `st`) has no dropout, gap or jitter: repairLog keeps it. */
export function nothingToRepair(n: number, nom: number, floor: number, st: Stats): boolean {
  return allFinite(st) && (n < 3 || (st.maxDt - nom <= floor && nom - st.minDt <= floor));
}

/** Repairs `log` (method at the top); `st` is its stats pass, `rowOf` maps a sample to its file row. */
export function repairLog(
  log: DriveLog,
  rowOf: (i: number) => number,
  o: RepairOptions,
  st: Stats,
): Repaired {
  const { timeS: t, crankRadS: c, gearboxRadS: g } = log;
  const n = t.length;
  const warnings: SignalIssue[] = [];
  const nom = n >= 3 ? nominalInterval(t) : 0;
  const floor = jitterFloor(n, nom, n >= 3 ? timeQuantum(t) : 0);
  if (nothingToRepair(n, nom, floor, st)) return { log, rowOf, warnings };
  const tolF = o.samplingTolerance ?? 0.25;
  const gapS = (o.gapFactor ?? 1.5) * nom;
  const limit = Math.min(o.repairMaxSamples ?? 20, Math.floor((o.repairMaxS ?? 0.01) / nom + 1e-9));
  const limitText = `the repair limit of ${countText(limit, "sample")} (${ms(limit * nom)})`;
  const names = (crank: boolean, gear: boolean) =>
    [crank ? log.source.crankColumn : "", gear ? log.source.gearboxColumn : ""]
      .filter((x) => x !== "")
      .map((x) => `"${x}"`)
      .join(" and ");
  const dropout = new Tally();
  const missing = new Tally();
  const jitter = new Tally();
  let dropC = false;
  let dropG = false;
  let maxDev = 0;
  const plans: SectionPlan[] = [];
  const irregular: number[] = [];
  let irregularCount = 0;
  let splits = 0;
  let first = -1;
  let p = -1; // the last sample with both speeds
  let start = -1;
  let regrid = false;
  let holeC = false;
  let holeG = false;
  for (let i = 0; i < n; i++) {
    if (i > 0) {
      const dt = t[i]! - t[i - 1]!;
      const dev = Math.abs(dt - nom);
      if (dt <= gapS && dev > floor) {
        if (dev > tolF * nom) {
          irregularCount++;
          if (irregular.length < 5) irregular.push(i);
        } else if (start >= 0) {
          jitter.add(1, i, i, t[i]!, t[i]!);
          maxDev = Math.max(maxDev, dev / nom);
          regrid = true;
        }
      }
    }
    const okC = c[i]! - c[i]! === 0; // false exactly for NaN and ±∞
    const okG = g[i]! - g[i]! === 0;
    if (!okC || !okG) {
      holeC ||= !okC;
      holeG ||= !okG;
      continue;
    }
    if (first < 0) {
      first = start = i;
      if (i > 0) warnings.push(leftOut(0, i - 1, "start", names(holeC, holeG)));
    } else if (i - p > 1 || t[i]! - t[p]! > gapS) {
      const dropped = i - p - 1;
      const total = Math.max(dropped, Math.round((t[i]! - t[p]!) / nom) - 1);
      if (total <= limit) {
        if (dropped > 0) {
          fillLinear(c, t, p, i);
          fillLinear(g, t, p, i);
          dropout.add(dropped, p + 1, i - 1, t[p + 1]!, t[i - 1]!);
          dropC ||= holeC;
          dropG ||= holeG;
        }
        if (total > dropped) {
          missing.add(total - dropped, p, i, t[p]!, t[i]!);
          regrid = true;
        }
      } else {
        plans.push({ a: start, b: p + 1, regrid });
        regrid = false;
        start = i;
        if (++splits <= MAX_SPLIT_WARNINGS) warnings.push(split(p, i, dropped, total));
      }
    }
    holeC = holeG = false;
    p = i;
  }

  /** Warning for a hole too long to fill, between valid samples a and b. */
  function split(a: number, b: number, dropped: number, total: number): SignalIssue {
    const longer = `longer than ${limitText}`;
    const message =
      dropped > 0
        ? `${names(holeC, holeG)} ${plural(holeC && holeG ? 2 : 1, "is", "are")} empty or not finite at ${rowSpan(rowOf(a + 1), rowOf(b - 1))} (${sec(t[a + 1]!)} to ${sec(t[b - 1]!)}, ${countText(dropped, "sample")}), ${longer}: these rows are left out and the log is analysed as separate sections before and after them`
        : `the time jumps from ${sec(t[a]!)} to ${sec(t[b]!)} between rows ${rowOf(a)} and ${rowOf(b)} (${countText(total, "sample")} missing), ${longer}: the log is analysed as separate sections before and after the gap`;
    return { code: "log_split", message, row: rowOf(b) };
  }
  function leftOut(a: number, b: number, where: string, what: string): SignalIssue {
    const message = `${rowSpan(rowOf(a), rowOf(b))} at the ${where} of the log ${a === b ? "has" : "have"} no value in ${what} to interpolate from on both sides and are left out`;
    return { code: "dropout_left_out", message, row: rowOf(a) };
  }

  if (first < 0) {
    const message = `no row has both a crank and a gearbox speed (${names(true, true)} are empty or not finite throughout)`;
    return { log, rowOf, warnings, error: { code: "no_speed_values", message } };
  }
  if (irregularCount > 0) {
    const rows = irregular.map(rowOf);
    const list = `${plural(irregularCount, "row")} ${rows.join(", ")}${irregularCount > rows.length ? ", …" : ""}`;
    const message = `sampling is irregular at ${countText(irregularCount, "row")} (${list}): intervals differ from ${ms(nom)} by more than ${Math.round(tolF * 100)} %, too far to resample onto a uniform grid`;
    const error = {
      code: "irregular_sampling",
      message,
      row: rows[0],
      column: log.source.timeColumn,
    };
    return { log, rowOf, warnings, error };
  }
  plans.push({ a: start, b: p + 1, regrid });
  if (p < n - 1) warnings.push(leftOut(p + 1, n - 1, "end", names(holeC, holeG)));
  if (splits > MAX_SPLIT_WARNINGS)
    warnings.push({
      code: "log_split",
      message: `${countText(splits - MAX_SPLIT_WARNINGS, "more gap or dropout", "more gaps or dropouts")} longer than ${limitText} split the log; it has ${plans.length} sections`,
    });

  const repairs: LogRepair[] = [];
  if (dropout.count > 0)
    repairs.push(
      dropout.record(
        "dropout_filled",
        rowOf,
        `${countText(dropout.count, "row")} with an empty or non-finite value in ${names(dropC, dropG)}`,
        `${plural(dropout.count, "was", "were")} filled by linear interpolation in time`,
      ),
    );
  if (missing.count > 0)
    repairs.push(
      missing.record(
        "missing_rows_filled",
        rowOf,
        `${countText(missing.count, "missing row")} in ${countText(missing.places, "gap")} in the time`,
        `${plural(missing.count, "was", "were")} filled by linear interpolation on the ${ms(nom)} sampling grid`,
      ),
    );
  if (jitter.count > 0)
    repairs.push(
      jitter.record(
        "jitter_resampled",
        rowOf,
        `timestamps at ${countText(jitter.count, "row")} were off the ${ms(nom)} sampling grid by up to ${Math.round(maxDev * 100)} %`,
        `and were resampled onto a uniform grid by cubic interpolation in time`,
      ),
    );
  for (const r of repairs) warnings.push({ code: r.code, message: r.message });
  return { ...applyPlan(log, rowOf, plans, nom, gapS, repairs), warnings };
}
