/**
 * The byte scanner of the CSV ingest (ingest.ts): reads plain numeric lines straight into
 * growing Float64Arrays, and the careful number reader for every field it is not sure of.
 * Also the delimiter and decimal-mark detection on the first lines. Units: none (numbers as
 * written); ingest.ts converts.
 */
import Papa from "papaparse";
import { float64Array } from "./shared-arrays.ts";

export const POW10 = Array.from({ length: 23 }, (_, i) => 10 ** i); // exact doubles up to 1e22
export const TWO53 = 2 ** 53;
const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;
const NON_FINITE = /^[+-]?(nan|inf|infinity)$/i;
export const MAX_LINE_BYTES = 1 << 20;
export const SAMPLE_LINES = 6;

/** Field status from the scanner. */
export const OK = 0,
  EMPTY = 1,
  TEXT = 2,
  NONFINITE = 3;

/**
 * The careful number reader for one field's text (also used on quoted fields): trims, strips
 * quotes, accepts an exponent, rejects hex and thousands separators. Unitless.
 */
export function parseNumberText(
  raw: string,
  decimal: "." | ",",
): { status: number; value: number } {
  let text = raw.trim();
  if (text.length >= 2 && text.startsWith('"') && text.endsWith('"'))
    text = text.slice(1, -1).trim();
  if (text === "") return { status: EMPTY, value: NaN };
  if (NON_FINITE.test(text)) return { status: NONFINITE, value: NaN };
  if (decimal === ",") {
    if (text.includes(".")) return { status: TEXT, value: NaN };
    text = text.replace(",", ".");
  }
  if (!NUMBER.test(text)) return { status: TEXT, value: NaN };
  const value = Number(text);
  return Number.isFinite(value) ? { status: OK, value } : { status: NONFINITE, value };
}

export function bytesToText(b: Uint8Array, s: number, e: number): string {
  let ascii = e - s < 256;
  for (let i = s; ascii && i < e; i++) if ((b[i] ?? 0) >= 128) ascii = false;
  return ascii
    ? String.fromCharCode(...b.subarray(s, e))
    : new TextDecoder().decode(b.subarray(s, e));
}

/** The first byte in [s, e) that plain text never holds (controls other than tab and CR), or −1. */
export function firstControlByte(b: Uint8Array, s: number, e: number): number {
  for (let i = s; i < e; i++) {
    const c = b[i] ?? 0;
    if (c < 32 && c !== 9 && c !== 13) return c;
  }
  return -1;
}

/** Row scratch: one value, status and (for bad fields) text per column. */
export interface RowScratch {
  vals: Float64Array;
  stat: Uint8Array;
  texts: string[];
}

/**
 * Scan one unquoted line [s, e) into `row`. Returns the field count, −1 when the line has a
 * quote (papaparse must split it), −2 when it holds a control byte (the file is not text).
 */
export function scanLine(
  b: Uint8Array,
  s: number,
  e: number,
  delim: number,
  dec: number,
  decimal: "." | ",",
  row: RowScratch,
): number {
  const max = row.vals.length;
  let f = 0;
  let i = s;
  for (;;) {
    const fs = i;
    let mant = 0,
      frac = -1,
      nd = 0,
      neg = false,
      plain = true;
    if (i < e && (b[i] === 45 || b[i] === 43)) neg = b[i++] === 45;
    for (; i < e; i++) {
      const c = b[i]!; // i < e ≤ b.length
      if (c === delim) break;
      const d = c - 48;
      if (d >= 0 && d <= 9) {
        mant = mant * 10 + d;
        nd++;
        if (frac >= 0) frac++;
      } else if (c === dec && frac < 0) frac = 0;
      else if (c === 34) return -1;
      else if (c < 32 && c !== 9 && c !== 13) return -2;
      else plain = false;
    }
    if (f < max) {
      if (plain && nd > 0 && mant < TWO53 && frac <= 22) {
        const v = frac > 0 ? mant / (POW10[frac] ?? 1) : mant;
        row.vals[f] = neg ? -v : v;
        row.stat[f] = OK;
      } else if (fs === i) {
        row.vals[f] = NaN;
        row.stat[f] = EMPTY;
      } else {
        const text = bytesToText(b, fs, i);
        const r = parseNumberText(text, decimal);
        row.vals[f] = r.value;
        row.stat[f] = r.status;
        row.texts[f] = text;
      }
    }
    f++;
    if (i >= e) return f;
    i++;
  }
}

/** Grow-on-demand Float64Array column. */
export class Column {
  data: Float64Array;
  private readonly sized: boolean;
  constructor(capacity: number, sized = false) {
    this.data = float64Array(capacity);
    this.sized = sized;
  }
  ensure(n: number): void {
    if (n < this.data.length) return;
    // Grow by half when unsized; by a tenth once sized from a hint (a near miss should not
    // leave a third of the buffer unused).
    const factor = this.sized ? 1.1 : 1.5;
    const next = float64Array(Math.max(1024, Math.ceil(this.data.length * factor)));
    next.set(this.data);
    this.data = next;
  }
  /**
   * The first n values as a view, never a copy: a copy would double the peak, while the unused
   * tail of a fresh buffer was never written and so holds no resident memory.
   */
  take(n: number): Float64Array {
    return this.data.subarray(0, n);
  }
}

export function concat(a: Uint8Array, b: Uint8Array): Uint8Array {
  const out = new Uint8Array(a.length + b.length);
  out.set(a);
  out.set(b, a.length);
  return out;
}

export const fmt = (v: number) => String(Number(v.toPrecision(10)));

/** Choose the delimiter whose field count is the same (and > 1) on the header and sample lines. */
export function detectDelimiter(lines: string[], forced?: string): string {
  const count = (line: string, d: string) =>
    (Papa.parse<string[]>(line, { delimiter: d }).data[0] ?? []).length;
  const cands = forced ? [forced] : ["\t", ";", ","];
  const header = lines[0] ?? "";
  for (const d of cands) {
    const n = count(header, d);
    if (n > 1 && lines.slice(1).every((l) => [n, n + 1].includes(count(l, d)))) return d;
  }
  let best = cands[cands.length - 1] ?? ",";
  for (const d of cands) if (count(header, d) > count(header, best)) best = d;
  return best;
}

/** Decimal comma when a non-comma delimiter is used and data fields are written "12,5". */
export function detectDecimal(lines: string[], delimiter: string): "." | "," {
  if (delimiter === ",") return ".";
  let comma = 0,
    point = 0;
  for (const line of lines.slice(1)) {
    for (const field of Papa.parse<string[]>(line, { delimiter }).data[0] ?? []) {
      if (/^\s*[+-]?\d*,\d+([eE][+-]?\d+)?\s*$/.test(field)) comma++;
      else if (/^\s*[+-]?\d*\.\d+([eE][+-]?\d+)?\s*$/.test(field)) point++;
    }
  }
  return comma > point ? "," : ".";
}
