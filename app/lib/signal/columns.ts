/**
 * Header recognition: which column is time, which is the crank side and which the gearbox
 * side, and in which unit each is written — from the names alone, always overridable.
 */
import { recogniseColumn, unitOfName } from "./column-names.ts";
import { teamChannel } from "./team-channels.ts";
import type { ChannelName, SignalIssue, SpeedUnit, TimeUnit } from "./types.ts";
import { unitCellText } from "./units.ts";

export { recogniseColumn, unitOfName, type ColumnGuess, type ColumnRole } from "./column-names.ts";

/** Options that override what the header says. Column names match case- and space-insensitively. */
export interface ColumnOptions {
  timeColumn?: string;
  crankColumn?: string;
  gearboxColumn?: string;
  /** Unit of both speed channels, unless crankUnit / gearboxUnit say otherwise. */
  unit?: SpeedUnit;
  crankUnit?: SpeedUnit;
  gearboxUnit?: SpeedUnit;
  timeUnit?: TimeUnit;
  /**
   * The team's own channel names (a team setting): they decide a channel's role before the
   * built-in recognition, and give its unit where the file states none. Explicit columns win.
   */
  channelNames?: readonly ChannelName[];
}

/** The decision ingest acts on: column indices into the header and the units to read them in. */
export interface ColumnMap {
  time: number;
  crank: number;
  gearbox: number;
  timeUnit: TimeUnit;
  crankUnit: SpeedUnit;
  gearboxUnit: SpeedUnit;
  /** Every other column, by index, with the name it is kept under in `extra`. */
  extra: { index: number; name: string }[];
}

/** An error about the header, with what a UI needs to offer a column mapping. */
export interface ColumnIssue extends SignalIssue {
  /** Every column name in the header, in file order. */
  columns: string[];
  /** The channel the problem is about. */
  role?: "time" | "crank" | "gearbox";
  /** Columns that could be that channel (two or more for ambiguous_columns). */
  candidates?: string[];
}

const norm = (s: string) => s.trim().toLowerCase().replace(/\s+/g, " ");

function columnIssue(
  code: string,
  message: string,
  headers: string[],
  extra: Partial<ColumnIssue> = {},
): ColumnIssue {
  return { code, message, row: 1, columns: [...headers], ...extra };
}

const quoteList = (names: string[]) => names.map((n) => `"${n}"`).join(", ");

/**
 * The names recognition reads: a header name with its units-row cell, when there is one, as a
 * bracketed unit ("n_kw" over "[1/min]" → "n_kw [1/min]"), so both go through one recogniser.
 */
export function namesWithUnits(
  headers: readonly string[],
  units: readonly (string | null | undefined)[] = [],
): string[] {
  return headers.map((h, i) => {
    const u = unitCellText(units[i] ?? "");
    return u === "" ? h : `${h} [${u}]`;
  });
}

/**
 * Decide the column map for a header row (and its units row, when the file has one). Returns
 * an issue (row 1) when a channel is missing, ambiguous, or an override names no column.
 * Order: explicit columns, then the team's channel names, then the built-in recognition.
 */
export function resolveColumns(
  headers: string[],
  options: ColumnOptions = {},
  units: readonly (string | null | undefined)[] = [],
): { ok: true; map: ColumnMap; warnings: SignalIssue[] } | { ok: false; error: ColumnIssue } {
  const named = namesWithUnits(headers, units);
  const guesses = named.map(recogniseColumn);
  const stated = named.map(unitOfName);
  const team = headers.map((h) => teamChannel(h, options.channelNames));
  const taken = new Set<number>();
  const warnings: SignalIssue[] = [];
  const chosen: Partial<Record<"time" | "crank" | "gearbox", number>> = {};
  const overrides = {
    time: options.timeColumn,
    crank: options.crankColumn,
    gearbox: options.gearboxColumn,
  };

  for (const role of ["time", "crank", "gearbox"] as const) {
    const wanted = overrides[role];
    if (wanted === undefined) continue;
    const index = headers.findIndex((h) => norm(h) === norm(wanted));
    if (index < 0) {
      return {
        ok: false,
        error: columnIssue(
          "unknown_column",
          `no column named "${wanted}" for the ${role} channel; the header has ${quoteList(headers)}`,
          headers,
          { role },
        ),
      };
    }
    if (taken.has(index)) {
      return {
        ok: false,
        error: columnIssue(
          "ambiguous_columns",
          `column "${headers[index]}" is set for two channels`,
          headers,
          { role, column: headers[index] },
        ),
      };
    }
    chosen[role] = index;
    taken.add(index);
  }
  for (const role of ["time", "crank", "gearbox"] as const) {
    if (chosen[role] !== undefined) continue;
    // A column the team has named is decided by that name alone, never by the built-in words.
    const byTeam = team.flatMap((c, i) => (c?.role === role && !taken.has(i) ? [i] : []));
    const candidates =
      byTeam.length > 0
        ? byTeam
        : guesses.flatMap((g, i) => (g.role === role && !taken.has(i) && !team[i] ? [i] : []));
    const label =
      role === "time" ? "time" : role === "crank" ? "crank-side speed" : "gearbox-side speed";
    if (candidates.length === 0) {
      return {
        ok: false,
        error: columnIssue(
          "missing_channel",
          `no ${label} column recognised in the header (${quoteList(headers)}); choose one`,
          headers,
          { role, candidates: [] },
        ),
      };
    }
    if (candidates.length > 1) {
      const names = candidates.map((i) => headers[i] ?? "");
      return {
        ok: false,
        error: columnIssue(
          "ambiguous_columns",
          `${candidates.length} columns could be the ${label}: ${quoteList(names)}; choose one`,
          headers,
          { role, candidates: names },
        ),
      };
    }
    chosen[role] = candidates[0];
    taken.add(candidates[0] ?? -1);
  }
  const time = chosen.time ?? 0;
  const crank = chosen.crank ?? 0;
  const gearbox = chosen.gearbox ?? 0;

  const speedUnit = (index: number, explicit: SpeedUnit | undefined): SpeedUnit => {
    const unit = explicit ?? options.unit ?? stated[index]?.speedUnit ?? team[index]?.speedUnit;
    if (unit) return unit;
    warnings.push({
      code: "unit_assumed",
      message: `no unit in column "${headers[index]}"; read as rpm (set the unit if that is wrong)`,
      row: 1,
      column: headers[index],
    });
    return "rpm";
  };
  const crankUnit = speedUnit(crank, options.crankUnit);
  const gearboxUnit = speedUnit(gearbox, options.gearboxUnit);
  let timeUnit = options.timeUnit ?? stated[time]?.timeUnit ?? team[time]?.timeUnit;
  if (!timeUnit) {
    warnings.push({
      code: "unit_assumed",
      message: `no unit in column "${headers[time]}"; read as seconds (set the time unit if that is wrong)`,
      row: 1,
      column: headers[time],
    });
    timeUnit = "s";
  }

  const seen = new Map<string, number>();
  const extra: ColumnMap["extra"] = [];
  headers.forEach((h, index) => {
    if (taken.has(index)) return;
    const base = h.trim() === "" ? `column ${index + 1}` : h;
    const count = (seen.get(base) ?? 0) + 1;
    seen.set(base, count);
    extra.push({ index, name: count === 1 ? base : `${base} (${count})` });
  });
  return {
    ok: true,
    map: { time, crank, gearbox, timeUnit, crankUnit, gearboxUnit, extra },
    warnings,
  };
}

/**
 * The part of a remembered column choice (a vehicle's mapping, made for an earlier file) that
 * fits a new file's header, or null when nothing of it applies. It is a suggestion: when a column
 * it names is not in this header, none of it applies and the header is recognised as usual (a
 * choice made for one odd file must not break the next, ordinary one). A remembered unit goes
 * with a column the choice names; for a channel left to the header it only fills in a unit that
 * the recognised column's name (or units row) does not give (the file's own unit always wins).
 */
export function fitRemembered(
  headers: string[],
  remembered: ColumnOptions,
  units: readonly (string | null | undefined)[] = [],
): ColumnOptions | null {
  const has = (name: string) => headers.some((h) => norm(h) === norm(name));
  const named = [remembered.timeColumn, remembered.crankColumn, remembered.gearboxColumn];
  if (named.some((n) => n !== undefined && !has(n))) return null;
  const guesses = namesWithUnits(headers, units).map(recogniseColumn);
  const headerUnit = (role: "time" | "crank" | "gearbox") =>
    guesses.some((g) => g.role === role && (role === "time" ? g.timeUnit : g.speedUnit));
  const fitted: ColumnOptions = {};
  if (remembered.timeColumn !== undefined) fitted.timeColumn = remembered.timeColumn;
  if (remembered.crankColumn !== undefined) fitted.crankColumn = remembered.crankColumn;
  if (remembered.gearboxColumn !== undefined) fitted.gearboxColumn = remembered.gearboxColumn;
  const timeUnit = remembered.timeUnit;
  if (timeUnit && (fitted.timeColumn !== undefined || !headerUnit("time")))
    fitted.timeUnit = timeUnit;
  const crankUnit = remembered.crankUnit ?? remembered.unit;
  if (crankUnit && (fitted.crankColumn !== undefined || !headerUnit("crank")))
    fitted.crankUnit = crankUnit;
  const gearboxUnit = remembered.gearboxUnit ?? remembered.unit;
  if (gearboxUnit && (fitted.gearboxColumn !== undefined || !headerUnit("gearbox")))
    fitted.gearboxUnit = gearboxUnit;
  return Object.keys(fitted).length > 0 ? fitted : null;
}
