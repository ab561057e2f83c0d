import Papa from "papaparse";
import type { AnalysisResult } from "../signal/result-schema";
import { rpmToRadS } from "./chart-units";

/**
 * CSV tables for spreadsheets and scripts: one writer (papaparse's unparse, RFC 4180 quoting)
 * that neutralises every text cell a spreadsheet would run as a formula, and the export pack's
 * per-log tables in SI units (docs/export-pack.md).
 */

/** A cell: numbers and booleans are written as they are, text is neutralised, null is empty. */
export type CsvCell = string | number | boolean | null;

/**
 * The start of a text cell that a spreadsheet reads as a formula, after OWASP's "CSV Injection"
 * guidance (a cell must not begin with `=`, `+`, `-`, `@`, tab or carriage return; OWASP ASVS 5.0
 * V1.2.10 adds NUL) and, our own addition, a line feed. A `-` is let through only when the whole
 * text is a plain decimal number such as `-3.5` or `-1e-7` (a negative number, not a formula:
 * `-1+1` is caught). Anchored at the very start; `$` matches only at the end of the text.
 */
export const FORMULA_START = /^(?:[=+@\t\r\n\0]|-(?!\d+(?:\.\d+)?(?:[eE][-+]?\d+)?$))/;

/** The text as a spreadsheet must show it: prefixed with an apostrophe when it could run. */
export function neutraliseText(text: string): string {
  return FORMULA_START.test(text) ? `'${text}` : text;
}

/**
 * The table as CSV text, one header row, `newline` after every row (CRLF, RFC 4180 §2.1, unless
 * told otherwise). Text cells (and header names) that could run as a formula get an apostrophe
 * in front (papaparse's escapeFormulae with FORMULA_START: numbers and booleans are never
 * touched, so -3.5 stays a number). A number that is not finite is a bug and throws.
 */
export function spreadsheetCsv(
  fields: readonly string[],
  rows: readonly (readonly CsvCell[])[],
  newline = "\r\n",
): string {
  for (const row of rows)
    for (const cell of row)
      if (typeof cell === "number" && !Number.isFinite(cell))
        throw new Error(`not a finite number in a CSV cell: ${cell}`);
  const data = rows.map((row) => row.map((cell) => cell ?? ""));
  return (
    Papa.unparse({ fields: [...fields], data }, { newline, escapeFormulae: FORMULA_START }) +
    newline
  );
}

/** isolation.csv's columns (a public contract: docs/export-pack.md). */
export const ISOLATION_FIELDS = [
  "engine_speed [rad/s]",
  "isolation [dB]",
  "blocks",
  "above_noise",
  "method",
] as const;

/**
 * The isolation curve at the firing order, one row per engine-speed bin as in the result: the
 * bin's engine speed in rad/s (the result's rpm × 2π/60), the isolation in dB (20·log10 of crank
 * over gearbox amplitude, positive = attenuated), the blocks averaged, whether the bin is above
 * the noise floor, and how it was measured (`blocks` or `filter`; empty in results stored before
 * issue 15).
 */
export function isolationCsv(result: AnalysisResult): string {
  return spreadsheetCsv(
    ISOLATION_FIELDS,
    result.isolation.map((p) => [rpmToRadS(p.rpm), p.dB, p.blocks, p.aboveNoise, p.method ?? ""]),
  );
}

/** order-curves.csv's columns (a public contract: docs/export-pack.md). */
export const ORDER_CURVE_FIELDS = [
  "order",
  "engine_speed [rad/s]",
  "crank_amplitude [rad/s]",
  "gearbox_amplitude [rad/s]",
  "blocks",
] as const;

/**
 * Every tracked order's curve in long format, one row per (order, bin), orders and bins in the
 * result's order: the 0-peak angular-velocity amplitudes at the crank and the gearbox input in
 * rad/s (the result's rpm × 2π/60), the bin's engine speed in rad/s.
 */
export function orderCurvesCsv(result: AnalysisResult): string {
  return spreadsheetCsv(
    ORDER_CURVE_FIELDS,
    result.orderCurves.flatMap((c) =>
      c.points.map((p) => [
        c.order,
        rpmToRadS(p.rpm),
        rpmToRadS(p.crankRpm),
        rpmToRadS(p.gearboxRpm),
        p.blocks,
      ]),
    ),
  );
}

/** One exported drive log in logs.csv, the pack's index. */
export interface PackIndexRow {
  logId: number;
  folder: string;
  fileName: string;
  condition: string;
  gear: number | null;
  damperVariant: string;
  testDate: string | null;
  uploadedAt: string;
  analysisId: number;
  analysisVersion: number;
  firingOrder: number;
  notes: string;
}

export const INDEX_FIELDS = [
  "log_id",
  "folder",
  "file_name",
  "condition",
  "gear",
  "damper_variant",
  "test_date",
  "uploaded_at",
  "analysis_id",
  "analysis_version",
  "firing_order",
  "notes",
] as const;

/** logs.csv: one row per exported drive log; its text cells (file name, notes …) neutralised. */
export function packIndexCsv(rows: readonly PackIndexRow[]): string {
  return spreadsheetCsv(
    INDEX_FIELDS,
    rows.map((r) => [
      r.logId,
      r.folder,
      r.fileName,
      r.condition,
      r.gear,
      r.damperVariant,
      r.testDate,
      r.uploadedAt,
      r.analysisId,
      r.analysisVersion,
      r.firingOrder,
      r.notes,
    ]),
  );
}
