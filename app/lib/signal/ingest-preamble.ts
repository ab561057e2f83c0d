/**
 * Finding the header of a CSV drive log behind a logger's preamble (ingest-header.ts): recorder
 * metadata as key/value lines, comment lines and blank lines may come first, and a units row may
 * sit right under the header. The header is the first row of names followed by a run of numeric
 * rows with the same field count (or the row the user picks). Pure text, no bytes: the lines
 * come decoded, each with its 1-based file line number.
 */
import Papa from "papaparse";
import { detectDelimiter, EMPTY, parseNumberText, TEXT } from "./ingest-scan.ts";
import type { SourceMetadataEntry } from "./types.ts";
import { parseSpeedUnit, parseTimeUnit, unitCellText } from "./units.ts";

/** A decoded line of the head: its text (no line end) and its 1-based file line number. */
export interface HeadLine {
  text: string;
  line: number;
}

/** How many numeric rows after the header make it certain (fewer when the file ends first). */
export const DATA_RUN = 5;

/** Where the head was found: indices into the lines given to locateHeader. */
export interface HeadLocation {
  header: number;
  /** The units row under the header, when there is one. */
  units: number | undefined;
  delimiter: string;
  /** The data rows the decision rests on (for the decimal mark and the channel sizes). */
  run: number[];
}

const COMMENT = /^\s*(#|\/\/|%)/;

export const isBlank = (text: string) => text.trim() === "";
export const isComment = (text: string) => COMMENT.test(text);

/**
 * Fields of one line; papaparse only when there is a quote (it is slow on short lines). A
 * trailing empty field is dropped unless `keepTrailing` (a data row's empty last cell counts).
 */
export function splitFields(text: string, delimiter: string, keepTrailing = false): string[] {
  const fields = text.includes('"')
    ? (Papa.parse<string[]>(text, { delimiter }).data[0] ?? [])
    : text.split(delimiter);
  if (!keepTrailing && fields.length > 1 && (fields[fields.length - 1] ?? "").trim() === "")
    fields.pop();
  return fields;
}

/** 0 for an empty cell, 1 for a number (NaN and inf count: dropouts), 2 for text. */
function cellKind(text: string, delimiter: string): 0 | 1 | 2 {
  const dot = parseNumberText(text, ".").status;
  if (dot === EMPTY) return 0;
  if (dot !== TEXT) return 1;
  if (delimiter !== "," && parseNumberText(text, ",").status !== TEXT) return 1;
  return 2;
}

function kinds(fields: string[], delimiter: string): { numbers: number; texts: number } {
  let numbers = 0,
    texts = 0;
  for (const f of fields) {
    const k = cellKind(f, delimiter);
    if (k === 1) numbers++;
    else if (k === 2) texts++;
  }
  return { numbers, texts };
}

/** A row of names: two or more, and not one of them a number. */
function isNames(fields: string[], delimiter: string): boolean {
  const k = kinds(fields, delimiter);
  return k.numbers === 0 && k.texts >= 2;
}

/** A data row: some numbers and no more text than numbers (a gear "N" column may be text). */
function isData(fields: string[], delimiter: string): boolean {
  const k = kinds(fields, delimiter);
  return k.numbers > 0 && k.numbers >= k.texts;
}

/**
 * A units row: no numbers, at most the header's field count, every cell short, and at least one
 * cell that is plainly a unit (bracketed, "-", or a time or speed unit) — a second row of names
 * or a row of text data is not one.
 */
function isUnits(fields: string[], width: number, delimiter: string): boolean {
  if (fields.length > width || kinds(fields, delimiter).numbers > 0) return false;
  let plain = false;
  for (const raw of fields) {
    const f = raw.trim().replace(/^"(.*)"$/, "$1");
    if (f === "") continue;
    const bracketed = /^[[({].*[\])}]$/.test(f);
    if (!bracketed && (f.length > 16 || /\s/.test(f))) return false;
    if (bracketed || f === "-" || parseSpeedUnit(f) || parseTimeUnit(f)) plain = true;
  }
  return plain;
}

/**
 * Index of the next line from `from` that is not blank (nor a comment, unless `comments`), or
 * −1. Under the header only blank lines are skipped, as the row reader skips them.
 */
function nextContent(lines: readonly HeadLine[], from: number, comments = false): number {
  for (let i = from; i < lines.length; i++) {
    const text = lines[i]?.text ?? "";
    if (!isBlank(text) && (comments || !isComment(text))) return i;
  }
  return -1;
}

type Try = HeadLocation | "more" | undefined;

/**
 * Whether line `h` is the header with `delimiter`: a units row may follow, then DATA_RUN data
 * rows in the header's field count (fewer when `complete` and the lines run out). "more" when
 * the lines end before that can be told and more may come; `loose` accepts one data row of any
 * width (the fallback that lets the row reader name a bad row).
 */
function tryHeader(
  lines: readonly HeadLine[],
  h: number,
  delimiter: string,
  complete: boolean,
  loose: boolean,
): Try {
  const names = splitFields(lines[h]?.text ?? "", delimiter);
  const width = names.length;
  if (width < 2) return undefined;
  let i = nextContent(lines, h + 1, true);
  let units: number | undefined;
  if (i >= 0 && isUnits(splitFields(lines[i]?.text ?? "", delimiter), width, delimiter)) {
    units = i;
    i = nextContent(lines, i + 1, true);
  }
  const run: number[] = [];
  for (; i >= 0 && run.length < DATA_RUN; i = nextContent(lines, i + 1, true)) {
    const fields = splitFields(lines[i]?.text ?? "", delimiter, true);
    if (!isData(fields, delimiter)) break;
    // One more field is a delimiter at the end of every line (the header's dropped empty name).
    if (fields.length !== width && fields.length !== width + 1 && !loose) break;
    run.push(i);
    if (loose) break;
  }
  const ended = i < 0;
  if (run.length >= (loose ? 1 : DATA_RUN)) return { header: h, units, delimiter, run };
  if (ended && !complete) return "more";
  if (ended && run.length > 0) return { header: h, units, delimiter, run };
  return undefined;
}

const DELIMITERS = ["\t", ";", ","];

/**
 * The header among `lines` (the head of the file, in order): `headerRow` when the user picked
 * one, else the first row of names followed by a run of data rows; failing that, the first row
 * of names followed by one data row, and last the first line that is not blank or a comment.
 * "more" when more lines are needed and `complete` is false; undefined when there is no line.
 */
export function locateHeader(
  lines: readonly HeadLine[],
  complete: boolean,
  options: { delimiter?: string; headerRow?: number },
): HeadLocation | "more" | undefined {
  const delims = options.delimiter ? [options.delimiter] : DELIMITERS;
  if (options.headerRow !== undefined) {
    const h = lines.findIndex((l) => l.line === options.headerRow);
    if (h < 0) return complete ? undefined : "more";
    if (isBlank(lines[h]?.text ?? "")) return undefined;
    for (const d of delims) {
      const found = tryHeader(lines, h, d, complete, false);
      if (found) return found;
    }
    return around(lines, h, options.delimiter);
  }
  for (const loose of [false, true]) {
    for (let h = nextContent(lines, 0); h >= 0; h = nextContent(lines, h + 1)) {
      for (const d of delims) {
        if (!isNames(splitFields(lines[h]?.text ?? "", d), d)) continue;
        const found = tryHeader(lines, h, d, complete, loose);
        if (found) return found;
      }
    }
  }
  const first = nextContent(lines, 0);
  return first < 0 ? undefined : around(lines, first, options.delimiter);
}

/** Line `h` as the header, the delimiter told from it and the next lines (the old rule). */
function around(lines: readonly HeadLine[], h: number, forced?: string): HeadLocation {
  const run: number[] = [];
  for (let i = nextContent(lines, h + 1, true); i >= 0 && run.length < DATA_RUN;)
    (run.push(i), (i = nextContent(lines, i + 1, true)));
  const texts = [h, ...run].map((i) => lines[i]?.text ?? "");
  return { header: h, units: undefined, delimiter: detectDelimiter(texts, forced), run };
}

/**
 * One preamble line as a metadata entry. Comments (`#`, `//`, `%`) lose their mark; a line in
 * key/value form (`key;value`, `key,value`, `key: value`, `key=value`, tab) splits at the first
 * of those separators; any other line is kept whole as {key: "comment", value}. Trailing
 * delimiters (`Rate;5000;;;`) and quotes are dropped. Undefined for a blank or bare comment.
 */
export function preambleEntry(text: string): SourceMetadataEntry | undefined {
  let t = text.trim();
  const mark = COMMENT.exec(t);
  if (mark) t = t.slice(mark[0].trim().length + (mark.index ?? 0)).trim();
  t = t.replace(/[;,\t]+$/, "").trim();
  if (t === "") return undefined;
  const sep = /\t|;|=|:(?!\/\/)|,/.exec(t);
  const unquote = (s: string) =>
    s
      .trim()
      .replace(/^"(.*)"$/, "$1")
      .trim();
  if (!sep || sep.index === 0) return { key: "comment", value: unquote(t) };
  const key = unquote(t.slice(0, sep.index));
  const value = unquote(t.slice(sep.index + 1)).replace(/^[;,\t]+/, "");
  if (key === "" || /^\d/.test(key)) return { key: "comment", value: unquote(t) };
  return { key, value };
}

/** The preamble's entries in file order (blank lines and bare comment marks leave none). */
export function preambleMetadata(lines: readonly HeadLine[], end: number): SourceMetadataEntry[] {
  const out: SourceMetadataEntry[] = [];
  for (let i = 0; i < end; i++) {
    const entry = preambleEntry(lines[i]?.text ?? "");
    if (entry) out.push(entry);
  }
  return out;
}

/** The units row's cells, brackets and "[-]" removed ("" where a column has none). */
export function unitsOf(text: string | undefined, delimiter: string, width: number): string[] {
  const cells = text === undefined ? [] : splitFields(text, delimiter);
  return Array.from({ length: width }, (_, i) =>
    unitCellText((cells[i] ?? "").replace(/^\s*"(.*)"\s*$/, "$1")),
  );
}

export { unitCellText };
