/**
 * The last step of every ingest, whatever the format (CSV in ingest.ts, MDF4 in mdf4/): the
 * whole-log checks (ingest-checks.ts) and the repairs of dropouts, short gaps and jitter, so a
 * CSV and an MDF4 file of the same samples end up as the same DriveLog with the same warnings.
 */
import { checkLog, type CheckOptions } from "./ingest-checks.ts";
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
 * file row (CSV) or record number (MDF4) for the messages.
 */
export function finishLog(
  log: DriveLog,
  rowOf: (i: number) => number,
  options: FinishOptions,
): Outcome<DriveLog> {
  const checked = checkLog(log, rowOf, options);
  if (checked.error) return { ok: false, error: checked.error, warnings: checked.warnings };
  return { ok: true, value: log, warnings: checked.warnings };
}
