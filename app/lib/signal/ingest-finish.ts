/**
 * The last step of every ingest, whatever the format (CSV in ingest.ts, MDF4 in mdf4/): the
 * whole-log checks (ingest-checks.ts) and the repairs of dropouts, short gaps and jitter
 * (ingest-repairs.ts), so a CSV and an MDF4 file of the same samples end up as the same
 * DriveLog with the same warnings.
 */
import {
  allFinite,
  contentWarnings,
  firstNonFinite,
  logStats,
  samplingProblem,
  type CheckOptions,
  type Stats,
} from "./ingest-checks.ts";
import { repairLog } from "./ingest-repairs.ts";
import type { DriveLog, Outcome } from "./types.ts";

export interface FinishOptions extends CheckOptions {
  /** Refuse instead of repair: any dropout, gap or jitter is an error (CLI --strict, a team setting). */
  strict?: boolean;
  /** Longest run of missing samples or rows filled by interpolation, in s (default 0.01). */
  repairMaxS?: number;
  /** …and in samples (default 20); the shorter of the two applies. */
  repairMaxSamples?: number;
}

/**
 * Checks (and, unless strict, repairs) a freshly read log. `rowOf` maps a sample index to its
 * file row (CSV) or record number (MDF4) for the messages. `stats`: the log's logStats when the
 * caller has them already (the two-thread ingest gathers them per half).
 */
export function finishLog(
  log: DriveLog,
  rowOf: (i: number) => number,
  options: FinishOptions,
  stats?: Stats,
): Outcome<DriveLog> {
  // One pass for the extremes, the revolutions and whether any value is NaN (ingest-checks.ts).
  const st = stats ?? logStats(log);
  if (options.strict) {
    // Strict: the refusals as they were before repairs existed, with the same messages.
    const error = !allFinite(st)
      ? firstNonFinite(log, rowOf)
      : samplingProblem(log, rowOf, options, st);
    if (error) return { ok: false, error, warnings: [] };
    return { ok: true, value: log, warnings: contentWarnings(log, rowOf, options, st) };
  }
  const repaired = repairLog(log, rowOf, options, st);
  if (repaired.error) return { ok: false, error: repaired.error, warnings: repaired.warnings };
  const out = repaired.log;
  // The stats pass again only when the samples changed (a log with nothing to repair keeps it).
  const st2 = out === log && allFinite(st) ? st : logStats(out);
  const warnings = [...repaired.warnings, ...contentWarnings(out, repaired.rowOf, options, st2)];
  return { ok: true, value: out, warnings };
}
