/**
 * Reading the head of a CSV drive log (ingest.ts, step 1): the first lines up to SAMPLE_LINES,
 * checked for text (no UTF-16, no control bytes, LF or CRLF endings), the delimiter and decimal
 * mark decided on them, the header row split by papaparse and its columns resolved to time,
 * crank and gearbox (columns.ts). A later preamble or units row belongs here too.
 */
import Papa from "papaparse";
import { resolveColumns, type ColumnMap, type ColumnOptions } from "./columns.ts";
import {
  bytesToText,
  detectDecimal,
  detectDelimiter,
  firstControlByte,
  SAMPLE_LINES,
} from "./ingest-scan.ts";
import type { SignalIssue } from "./types.ts";

export interface HeaderOptions extends ColumnOptions {
  /** Field delimiter; detected from the first lines when not given. */
  delimiter?: "," | ";" | "\t";
  /** Decimal mark; detected from the first data lines when not given ("." with a "," delimiter). */
  decimal?: "." | ",";
  /** The header's file line (1-based), when the user picks it instead of the detection. */
  headerRow?: number;
}

/** What the head of the file decided, for the row scanner and the channels. */
export interface LogHeader {
  delimiter: string;
  decimal: "." | ",";
  /** Column names in file order, trimmed (a trailing empty name is dropped). */
  headers: string[];
  map: ColumnMap;
  /** Column warnings, each with the header's row. */
  warnings: SignalIssue[];
  /** File line number (1-based) of the header row; data start on the next line. */
  headerLine: number;
  /** Byte offset in the head where the line after the header begins. */
  dataStart: number;
  /** Characters of the first data line (0 when there is none), to size the channels. */
  firstRowChars: number;
}

type HeaderOutcome = { ok: true; value: LogHeader } | { ok: false; error: SignalIssue };

function problem(code: string, message: string, row?: number): HeaderOutcome {
  return { ok: false, error: { code, message, ...(row !== undefined ? { row } : {}) } };
}

/**
 * Reads the header from `prefix`, the first bytes of the file (all of it when `atEnd`, else
 * at least SAMPLE_LINES + 1 lines or 64 kB). The first problem comes back as a value.
 */
export function readHeader(
  prefix: Uint8Array,
  atEnd: boolean,
  options: HeaderOptions,
): HeaderOutcome {
  let p = 0;
  let line = 0;
  if (prefix[0] === 0xef && prefix[1] === 0xbb && prefix[2] === 0xbf) p = 3;
  if ((prefix[0] === 0xff && prefix[1] === 0xfe) || (prefix[0] === 0xfe && prefix[1] === 0xff)) {
    return problem("not_text", "the file is UTF-16 text; save it as UTF-8 or plain ASCII CSV", 1);
  }
  const lines: string[] = [];
  let headerEnd = -1;
  let sampleLine = 0;
  if (!atEnd && prefix.indexOf(10, p) < 0) {
    const bad = firstControlByte(prefix, p, prefix.length);
    if (bad >= 0)
      return problem(
        "not_text",
        `the file is not text: control byte 0x${bad.toString(16).padStart(2, "0")} in row 1`,
        1,
      );
    return problem(
      "not_text",
      "the first line is longer than 64 kB; this does not look like a CSV drive log",
      1,
    );
  }
  while (p < prefix.length && lines.length < SAMPLE_LINES) {
    let nl = prefix.indexOf(10, p);
    if (nl < 0 && !atEnd) break;
    if (nl < 0) nl = prefix.length;
    const text = bytesToText(prefix, p, nl).replace(/\r$/, "");
    sampleLine++;
    if (headerEnd < 0) line++;
    // Checked here for the first lines too, before a binary "header" can pass as names.
    const bad = firstControlByte(prefix, p, nl);
    if (bad >= 0) {
      const hex = bad.toString(16).padStart(2, "0");
      return problem(
        "not_text",
        `the file is not text: control byte 0x${hex} in row ${sampleLine}`,
        sampleLine,
      );
    }
    if (text.trim() !== "") {
      lines.push(text);
      if (headerEnd < 0) headerEnd = nl + 1;
    }
    p = nl + 1;
  }
  if (lines.length === 0) return problem("empty_file", "the file is empty");
  if (prefix.indexOf(10) < 0 && prefix.indexOf(13) >= 0)
    return problem(
      "unsupported_line_endings",
      "lines end in CR only; save the file with LF or CRLF line endings",
      1,
    );
  const delimiter = detectDelimiter(lines, options.delimiter);
  const decimal = options.decimal ?? detectDecimal(lines, delimiter);
  if (delimiter === "," && decimal === ",")
    return problem("ambiguous_decimal", "a decimal comma cannot be used with a comma delimiter", 1);
  const headers = (Papa.parse<string[]>(lines[0] ?? "", { delimiter }).data[0] ?? []).map((h) =>
    h.trim(),
  );
  if (headers.length > 1 && headers[headers.length - 1] === "") headers.pop();
  const resolved = resolveColumns(headers, options);
  if (!resolved.ok) return { ok: false, error: { ...resolved.error, row: line } };
  return {
    ok: true,
    value: {
      delimiter,
      decimal,
      headers,
      map: resolved.map,
      warnings: resolved.warnings.map((w) => ({ ...w, row: line })),
      headerLine: line,
      dataStart: headerEnd < 0 ? prefix.length : headerEnd,
      firstRowChars: (lines[1] ?? "").length,
    },
  };
}
