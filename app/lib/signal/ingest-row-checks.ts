/**
 * The checks of one data row (ingest.ts, step 3, the careful path of ingest-rows.ts): field
 * count, a number in each of time, crank and gearbox, time increasing, speeds plausible. Each
 * problem names its file row and column in words a technician can act on. Units: the file's
 * own (the limits are in rpm and converted with the channel scales).
 */
import type { ColumnMap } from "./columns.ts";
import { EMPTY, fmt, NONFINITE, OK, type RowScratch } from "./ingest-scan.ts";
import type { SignalIssue } from "./types.ts";

/** What a row is checked against. */
export interface RowRules {
  map: ColumnMap;
  headers: string[];
  decimal: "." | ",";
  /** Plausible speeds of either channel, rpm. */
  minRpm: number;
  maxRpm: number;
  /** Crank and gearbox unit → rpm. */
  toRpmC: number;
  toRpmG: number;
  /**
   * Refuse an empty or non-finite cell (today's rule, CLI --strict). Otherwise a speed cell is a
   * dropout, stored as NaN for ingest-repairs.ts, and a row without a time is dropped (it then
   * counts as a missing row).
   */
  strict?: boolean;
}

/** rowProblem's answer for a row without a usable time when not strict: leave it out. */
export const DROP_ROW = "drop";

/** A problem with its row and column, in the shape every ingest issue has. */
export function issue(code: string, message: string, r?: number, column?: string): SignalIssue {
  return {
    code,
    message,
    ...(r !== undefined ? { row: r } : {}),
    ...(column !== undefined ? { column } : {}),
  };
}

/**
 * What is wrong with the row in `row` (f fields, read from file line r), or undefined when it
 * can be stored. `n` rows are stored so far, the last at raw time `prevTime`. A last row cut
 * short is not fatal: it is left out with a warning.
 */
export function rowProblem(
  rules: RowRules,
  row: RowScratch,
  f: number,
  r: number,
  last: boolean,
  n: number,
  prevTime: number,
): { issue: SignalIssue; fatal: boolean } | typeof DROP_ROW | undefined {
  const { map: m, headers, minRpm, maxRpm, toRpmC, toRpmG } = rules;
  const fatal = (code: string, message: string, column?: string) => ({
    issue: issue(code, message, r, column),
    fatal: true,
  });
  const cols = headers.length;
  if (f !== cols && !(f === cols + 1 && row.stat[cols] === EMPTY)) {
    if (last && f < cols) {
      return {
        issue: issue(
          "truncated_last_row",
          `the last row (row ${r}) has ${f} of ${cols} fields and was left out`,
          r,
        ),
        fatal: false,
      };
    }
    return fatal("wrong_field_count", `row ${r} has ${f} fields but the header has ${cols}`);
  }
  const st = row.stat;
  // Fast path: a clean row allocates nothing; the loops below only run on a problem.
  if (((st[m.time] ?? 0) | (st[m.crank] ?? 0) | (st[m.gearbox] ?? 0)) !== OK)
    for (const [i, what] of [
      [m.time, "time"],
      [m.crank, "crank speed"],
      [m.gearbox, "gearbox speed"],
    ] as const) {
      const s = row.stat[i];
      if (s === OK) continue;
      const name = headers[i] ?? "";
      const text = row.texts[i] ?? "";
      // Not strict: a sensor dropout is repaired or splits the log later (ingest-repairs.ts);
      // text that is not a number stays an error (a wrong column or decimal mark, not a dropout).
      if ((s === EMPTY || s === NONFINITE) && !rules.strict) {
        if (i === m.time) return DROP_ROW;
        continue;
      }
      if (s === EMPTY)
        return fatal("missing_value", `row ${r}, column "${name}": the ${what} is empty`, name);
      if (s === NONFINITE)
        return fatal(
          "non_finite",
          `row ${r}, column "${name}": the ${what} "${text.trim()}" is not a finite number`,
          name,
        );
      // A decimal comma the first rows did not show (they held whole numbers) is the usual cause.
      const hint =
        rules.decimal === "." && /^\s*[+-]?\d+,\d+\s*$/.test(text)
          ? ' (for decimal commas set the decimal mark to ",")'
          : "";
      return fatal(
        "not_numeric",
        `row ${r}, column "${name}": "${text.trim()}" is not a number${hint}`,
        name,
      );
    }
  const rawT = row.vals[m.time] ?? NaN;
  if (n > 0 && !(rawT > prevTime)) {
    const u = m.timeUnit;
    const name = headers[m.time];
    if (rawT === prevTime)
      return fatal(
        "time_not_increasing",
        `time repeats at row ${r} (${fmt(rawT)} ${u} twice)`,
        name,
      );
    return fatal(
      "time_not_increasing",
      `time goes backwards at row ${r} (${fmt(rawT)} ${u} after ${fmt(prevTime)} ${u})`,
      name,
    );
  }
  const rawC = row.vals[m.crank] ?? NaN;
  const rawG = row.vals[m.gearbox] ?? NaN;
  const rpmC = rawC * toRpmC;
  const rpmG = rawG * toRpmG;
  // A dropout (NaN, only when not strict) is not a speed and so not implausible.
  const fine = (rpm: number) => rpm !== rpm || (rpm >= minRpm && rpm <= maxRpm);
  const plausible = fine(rpmC) && fine(rpmG);
  if (!plausible)
    for (const [raw, toRpm, i, unit] of [
      [rawC, toRpmC, m.crank, m.crankUnit],
      [rawG, toRpmG, m.gearbox, m.gearboxUnit],
    ] as const) {
      const rpm = raw * toRpm;
      if (fine(rpm)) continue;
      const name = headers[i] ?? "";
      const why = rpm < 0 ? "negative" : `above ${maxRpm} rpm`;
      return fatal(
        "implausible_speed",
        `row ${r}, column "${name}": speed ${fmt(raw)} ${unit} is implausible (${why})`,
        name,
      );
    }
  return undefined;
}
