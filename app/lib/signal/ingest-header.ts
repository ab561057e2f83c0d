/**
 * Reading the head of a CSV drive log (ingest.ts, step 1): the lines before the data, checked
 * for text (no UTF-16, no control bytes, LF or CRLF endings); the header found behind a
 * preamble, with its units row (ingest-preamble.ts); the delimiter and decimal mark decided on
 * the header and the first data rows; the columns resolved to time, crank and gearbox
 * (columns.ts). The preamble is kept as the log's source metadata.
 */
import { resolveColumns, type ColumnMap, type ColumnOptions } from "./columns.ts";
import {
  locateHeader,
  preambleMetadata,
  splitFields,
  unitsOf,
  type HeadLine,
} from "./ingest-preamble.ts";
import { bytesToText, detectDecimal, firstControlByte } from "./ingest-scan.ts";
import { statedRateHz } from "./stated-rate.ts";
import type { SignalIssue, SourceMetadataEntry } from "./types.ts";

export interface HeaderOptions extends ColumnOptions {
  /** Field delimiter; detected from the first lines when not given. */
  delimiter?: "," | ";" | "\t";
  /** Decimal mark; detected from the first data lines when not given ("." with a "," delimiter). */
  decimal?: "." | ",";
  /** The header's file line (1-based), when the user picks it instead of the detection. */
  headerRow?: number;
}

/**
 * How far the head may reach: a preamble of a few hundred lines fits; a longer one needs
 * `headerRow` within this window too. Past it the data are read by the row scanner.
 */
export const HEAD_MAX_BYTES = 256 * 1024;
export const HEAD_MAX_LINES = 2000;

/** Where the data of a CSV file begin, and what came before them. */
export interface CsvHead {
  delimiter: string;
  decimal: "." | ",";
  /** Column names in file order, trimmed (a trailing empty name is dropped). */
  headers: string[];
  /** The units row's cell per column without brackets ("" where none, or no units row). */
  units: string[];
  /** The preamble's lines as entries, in file order (ingest-preamble.ts preambleEntry). */
  metadata: SourceMetadataEntry[];
  /** The sample rate the preamble states, in Hz (stated-rate.ts). */
  statedRateHz: number | undefined;
  /** File line number (1-based) of the header row. */
  headerLine: number;
  /** File line number of the last line before the data: the units row, else the header. */
  lastHeadLine: number;
  /** Byte offset in the head where the line after lastHeadLine begins. */
  dataStart: number;
  /** Characters of the first data line (0 when there is none), to size the channels. */
  firstRowChars: number;
}

/** What the head of the file decided, for the row scanner and the channels. */
export interface LogHeader extends CsvHead {
  map: ColumnMap;
  /** Column warnings, each with the header's row. */
  warnings: SignalIssue[];
}

/** A problem, or "more" when the head needs more bytes before it can be decided. */
export type HeadOutcome<T> =
  { ok: true; value: T } | { ok: false; error: SignalIssue } | { ok: "more" };

function problem(code: string, message: string, row?: number): { ok: false; error: SignalIssue } {
  return { ok: false, error: { code, message, ...(row !== undefined ? { row } : {}) } };
}

const hex = (b: number) => b.toString(16).padStart(2, "0");

/**
 * Finds the head in `prefix`, the first bytes of the file (all of it when `atEnd`). Decodes at
 * most HEAD_MAX_LINES lines or HEAD_MAX_BYTES; "more" when the prefix ends before the header
 * and its data run could be told.
 */
export function locateHead(
  prefix: Uint8Array,
  atEnd: boolean,
  options: HeaderOptions,
): HeadOutcome<CsvHead> {
  let p = 0;
  if (prefix[0] === 0xef && prefix[1] === 0xbb && prefix[2] === 0xbf) p = 3;
  if ((prefix[0] === 0xff && prefix[1] === 0xfe) || (prefix[0] === 0xfe && prefix[1] === 0xff))
    return problem("not_text", "the file is UTF-16 text; save it as UTF-8 or plain ASCII CSV", 1);
  const first = prefix.indexOf(10, p);
  if (first < 0 && prefix.indexOf(13) >= 0)
    return problem(
      "unsupported_line_endings",
      "lines end in CR only; save the file with LF or CRLF line endings",
      1,
    );
  if (first < 0 && !atEnd) {
    const bad = firstControlByte(prefix, p, prefix.length);
    if (bad >= 0)
      return problem("not_text", `the file is not text: control byte 0x${hex(bad)} in row 1`, 1);
    if (prefix.length < HEAD_MAX_BYTES) return { ok: "more" };
    return problem(
      "not_text",
      "the first line is longer than 256 kB; this does not look like a CSV drive log",
      1,
    );
  }
  const lines: HeadLine[] = [];
  const ends: number[] = []; // byte offset after each line's newline
  let complete = atEnd;
  let control: { line: number; byte: number } | undefined;
  while (p < prefix.length) {
    if (lines.length >= HEAD_MAX_LINES || p >= HEAD_MAX_BYTES) {
      complete = true; // the window is full: decide on what it holds
      break;
    }
    let nl = prefix.indexOf(10, p);
    if (nl < 0 && !atEnd) break;
    if (nl < 0) nl = prefix.length;
    const bad = firstControlByte(prefix, p, nl);
    if (bad >= 0) {
      // Decided on the lines before it: a binary file has no header there, a text file with a
      // bad row further down reaches the row reader, which names that row.
      control = { line: lines.length + 1, byte: bad };
      complete = true;
      break;
    }
    lines.push({ text: bytesToText(prefix, p, nl).replace(/\r$/, ""), line: lines.length + 1 });
    ends.push(nl + 1);
    p = nl + 1;
  }
  const at = locateHeader(lines, complete, options);
  if (at === "more") return { ok: "more" };
  // No data row before the control byte: a binary file, not a drive log with one bad row.
  if (!at || (control && at.run.length === 0)) {
    if (control)
      return problem(
        "not_text",
        `the file is not text: control byte 0x${hex(control.byte)} in row ${control.line}`,
        control.line,
      );
    if (options.headerRow !== undefined)
      return problem(
        "header_row_not_found",
        `row ${options.headerRow} is blank or not among the first ${HEAD_MAX_LINES} lines; choose the row the column names are on`,
        options.headerRow,
      );
    if (lines.every((l) => l.text.trim() === "")) return problem("empty_file", "the file is empty");
    return problem("no_header_row", "the file holds only comments or metadata, no header row");
  }
  const { delimiter } = at;
  const headerText = lines[at.header]?.text ?? "";
  const runTexts = at.run.map((i) => lines[i]?.text ?? "");
  const decimal = options.decimal ?? detectDecimal([headerText, ...runTexts], delimiter);
  if (delimiter === "," && decimal === ",")
    return problem("ambiguous_decimal", "a decimal comma cannot be used with a comma delimiter", 1);
  const headers = splitFields(headerText, delimiter).map((h) => h.trim().replace(/^"(.*)"$/, "$1"));
  const last = at.units ?? at.header;
  const metadata = preambleMetadata(lines, at.header);
  return {
    ok: true,
    value: {
      delimiter,
      decimal,
      headers,
      units: unitsOf(
        at.units === undefined ? undefined : lines[at.units]?.text,
        delimiter,
        headers.length,
      ),
      metadata,
      statedRateHz: statedRateHz(metadata),
      headerLine: at.header + 1,
      lastHeadLine: last + 1,
      dataStart: ends[last] ?? prefix.length,
      firstRowChars: runTexts[0]?.length ?? 0,
    },
  };
}

/** The head's columns resolved with the options; a problem carries the header's row. */
export function resolveHead(
  head: CsvHead,
  options: HeaderOptions,
): { ok: true; value: LogHeader } | { ok: false; error: SignalIssue } {
  const { headers, units, headerLine } = head;
  const resolved = resolveColumns(headers, options, units);
  if (!resolved.ok) return { ok: false, error: { ...resolved.error, row: headerLine } };
  const warnings = resolved.warnings.map((w) => ({ ...w, row: headerLine }));
  return { ok: true, value: { ...head, map: resolved.map, warnings } };
}
