import type { LogError } from "./drive-log-terms";

/** Error codes about the header, for which the drive-log page offers the channel chooser. */
export const MAPPING_CODES = new Set(["missing_channel", "ambiguous_columns", "unknown_column"]);

/**
 * True when another choice of columns or units may fix the failure: a header problem, or a
 * problem in one column's values (text in a speed column, a speed out of range because its
 * unit was read wrongly, …). Shared by the page (ui) and its action (http).
 */
export function canChooseColumnsFor(e: LogError): boolean {
  return MAPPING_CODES.has(e.code) || (e.column !== undefined && e.column !== null);
}
