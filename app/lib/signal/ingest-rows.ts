/**
 * Scanning the data rows of a CSV drive log (ingest.ts, step 2): the lines after the header,
 * chunk by chunk, into the channels. A row of plain numbers in the header's field count with
 * increasing time and plausible speeds is stored inline by the hot loop (scanBlock); any other
 * line is read carefully (scanLine, or papaparse for quoted fields) and checked by
 * ingest-row-checks.ts, which names the problem. Values are converted to s and rad/s on store.
 */
import Papa from "papaparse";
import type { Channels } from "./ingest-channels.ts";
import type { LogHeader } from "./ingest-header.ts";
import { DROP_ROW, issue, rowProblem, type RowRules } from "./ingest-row-checks.ts";
import {
  bytesToText,
  type Column,
  concat,
  MAX_LINE_BYTES,
  OK,
  parseNumberText,
  POW10,
  scanLine,
  TWO53,
  type RowScratch,
} from "./ingest-scan.ts";
import type { SignalIssue } from "./types.ts";

/** Reads the data lines into the channels; stops at the first problem. */
export interface RowReader {
  /** Reads every complete line of b (and the rest too when atEnd); b may be reused after. */
  feed(b: Uint8Array, atEnd: boolean): void;
  /** The first problem, once there is one. */
  readonly error: SignalIssue | undefined;
  /** Rows stored so far. */
  readonly rows: number;
  /** Data indices before which a blank line was skipped (to map an index back to its row). */
  readonly skipped: readonly number[];
}

/**
 * A reader for the rows after `header` into `ch`, speeds limited to [minRpm, maxRpm] rpm.
 * Warnings (a short last row) are pushed onto `warnings`.
 */
export function createRowReader(
  header: LogHeader,
  ch: Channels,
  limits: { minRpm: number; maxRpm: number; strict?: boolean },
  warnings: SignalIssue[],
): RowReader {
  const { headers, map, decimal, delimiter } = header;
  const { minRpm, maxRpm } = limits;
  const { t, crank, gear, extras, scaleT, radC, radG, toRpmC, toRpmG } = ch;
  const strict = limits.strict === true;
  const rules: RowRules = { map, headers, decimal, minRpm, maxRpm, toRpmC, toRpmG, strict };
  const delimByte = delimiter.charCodeAt(0);
  const decByte = decimal.charCodeAt(0);
  const row: RowScratch = {
    vals: new Float64Array(headers.length + 1),
    stat: new Uint8Array(headers.length + 1),
    texts: [],
  };
  let error: SignalIssue | undefined;
  let carry: Uint8Array = new Uint8Array(0);
  let line = header.headerLine; // file line number of the last line read
  const skipped: number[] = [];
  let n = 0;
  let prevTime = NaN;

  const fail = (code: string, message: string, r?: number) => {
    error ??= issue(code, message, r);
  };

  /** Check and store the row in `row` (f fields) read from file line r. */
  function commit(f: number, r: number, last: boolean): void {
    const problem = rowProblem(rules, row, f, r, last, n, prevTime);
    if (problem === DROP_ROW) {
      skipped.push(n); // counted like a blank line, so rows still map to file lines
      return;
    }
    if (problem) {
      if (problem.fatal) error ??= problem.issue;
      else warnings.push(problem.issue);
      return;
    }
    const m = map;
    const rawT = row.vals[m.time] ?? NaN;
    // A dropout (empty or non-finite cell, allowed when not strict) is stored as NaN.
    const rawC = row.stat[m.crank] === OK ? (row.vals[m.crank] ?? NaN) : NaN;
    const rawG = row.stat[m.gearbox] === OK ? (row.vals[m.gearbox] ?? NaN) : NaN;
    prevTime = rawT;
    t.ensure(n);
    crank.ensure(n);
    gear.ensure(n);
    t.data[n] = rawT * scaleT;
    crank.data[n] = rawC * radC;
    gear.data[n] = rawG * radG;
    for (let k = 0; k < m.extra.length; k++) {
      const col = extras[k] as Column;
      const idx = m.extra[k]?.index ?? 0;
      col.ensure(n);
      col.data[n] = row.stat[idx] === OK ? (row.vals[idx] ?? NaN) : NaN;
    }
    n++;
  }

  function readLine(b: Uint8Array, s: number, e: number, last: boolean): void {
    line++;
    if (e > s && b[e - 1] === 13) e--;
    if (e === s) {
      skipped.push(n);
      return;
    }
    let f = scanLine(b, s, e, delimByte, decByte, decimal, row);
    if (f === -2)
      return fail("not_text", `the file is not text: control bytes in row ${line}`, line);
    if (f === -1) {
      const fields = Papa.parse<string[]>(bytesToText(b, s, e), { delimiter }).data[0] ?? [];
      f = fields.length;
      fields.forEach((text, i) => {
        if (i >= row.vals.length) return;
        const r = parseNumberText(text, decimal);
        row.vals[i] = r.value;
        row.stat[i] = r.status;
        row.texts[i] = text;
      });
    }
    commit(f, line, last);
  }

  /**
   * The hot loop over the complete lines in [s, e) (b[e − 1] is '\n', so every inner loop ends
   * on a newline without a bounds check). A row of plain numbers in the header's field count is
   * checked and stored inline; any other line goes to readLine, the careful path. Returns e.
   * Measured on the 90 MB bench log: one pass here instead of indexOf + scanLine + commit per
   * line took the parse from about 0.8 s to the figure the bench prints. Nothing is allocated per
   * field or per row: digits, fraction and exponent become the value in place; only a field it
   * cannot read exactly (more than 15 digits, |exponent| > 22, text, quotes) goes to readLine.
   */
  function scanBlock(b: Uint8Array, s: number, e: number): number {
    const m = map;
    const cols = headers.length;
    const iT = m.time,
      iC = m.crank,
      iG = m.gearbox;
    const vals = row.vals;
    const xIdx = m.extra.map((x) => x.index);
    const nx = xIdx.length;
    const delim = delimByte,
      dec = decByte;
    const loC = minRpm / toRpmC,
      hiC = maxRpm / toRpmC,
      loG = minRpm / toRpmG,
      hiG = maxRpm / toRpmG;
    let tA = t.data,
      cA = crank.data,
      gA = gear.data;
    let xA = extras.map((x) => x.data);
    // The reader's counters as locals in the loop (a closure's variables live in its context):
    // written back before the careful path reads them and at the end.
    const pow10 = POW10,
      two53 = TWO53;
    let rows = n,
      lines = line,
      prev = prevTime;
    let i = s;
    while (i < e) {
      const ls = i;
      let f = 0;
      let clean = true;
      let c = 0;
      for (;;) {
        let mant = 0;
        let neg = false;
        c = b[i]!;
        if (c === 45) {
          neg = true;
          c = b[++i]!;
        } else if (c === 43) c = b[++i]!;
        // Integer digits, then fraction digits: separate loops keep the per-digit work minimal.
        const intStart = i;
        while (c >= 48 && c <= 57) {
          mant = mant * 10 + (c - 48);
          c = b[++i]!;
        }
        let nd = i - intStart;
        let frac = 0;
        if (c === dec) {
          c = b[++i]!;
          const fracStart = i;
          while (c >= 48 && c <= 57) {
            mant = mant * 10 + (c - 48);
            c = b[++i]!;
          }
          frac = i - fracStart;
          nd += frac;
        }
        // An exponent ("1.5e-3", "2E+04"): the decimal exponent e10 = exp − fraction digits.
        let e10 = -frac;
        let plain = true;
        if ((c === 101 || c === 69) && nd > 0) {
          c = b[++i]!;
          const expNeg = c === 45;
          if (c === 45 || c === 43) c = b[++i]!;
          const expStart = i;
          let exp = 0;
          while (c >= 48 && c <= 57) {
            exp = exp * 10 + (c - 48);
            c = b[++i]!;
          }
          if (i === expStart) plain = false;
          e10 += expNeg ? -exp : exp;
        }
        if (c === 13 && b[i + 1] === 10) c = b[++i]!; // CR only as part of CRLF
        if (c !== delim && c !== 10) {
          plain = false; // anything else in the field: the careful path reads it
          while (c !== delim && c !== 10) c = b[++i]!;
        }
        // Exact: mant < 2^53 and 10^|e10| ≤ 10^22 are both exact doubles, so one multiplication
        // or division rounds once, as Number() does (Clinger, PLDI 1990, the "fast path").
        if (plain && nd > 0 && mant < two53 && e10 >= -22 && e10 <= 22 && f < cols) {
          const v = e10 < 0 ? mant / pow10[-e10]! : mant * pow10[e10]!;
          vals[f] = neg ? -v : v;
        } else clean = false;
        f++;
        if (c === 10) break;
        i++;
      }
      const rawT = vals[iT]!,
        rawC = vals[iC]!,
        rawG = vals[iG]!;
      const fine =
        clean &&
        f === cols &&
        (rawT > prev || rows === 0) &&
        rawC >= loC &&
        rawC <= hiC &&
        rawG >= loG &&
        rawG <= hiG;
      if (!fine) {
        n = rows;
        line = lines;
        prevTime = prev;
        readLine(b, ls, i, false); // re-reads the line carefully and names the problem, if any
        rows = n;
        lines = line;
        prev = prevTime;
        if (error) return e;
        tA = t.data;
        cA = crank.data;
        gA = gear.data;
        xA = extras.map((x) => x.data);
      } else {
        lines++;
        if (rows >= tA.length) {
          for (const col of [t, crank, gear, ...extras]) col.ensure(rows);
          tA = t.data;
          cA = crank.data;
          gA = gear.data;
          xA = extras.map((x) => x.data);
        }
        tA[rows] = rawT * scaleT;
        cA[rows] = rawC * radC;
        gA[rows] = rawG * radG;
        for (let k = 0; k < nx; k++) xA[k]![rows] = vals[xIdx[k]!]!;
        prev = rawT;
        rows++;
      }
      i++;
    }
    n = rows;
    line = lines;
    prevTime = prev;
    return e;
  }

  function feed(b: Uint8Array, atEnd: boolean): void {
    let s = 0;
    if (carry.length > 0) {
      const nl = b.indexOf(10);
      if (nl < 0 && !atEnd) {
        carry = concat(carry, b);
        if (carry.length > MAX_LINE_BYTES)
          fail(
            "not_text",
            `line ${line + 1} is longer than 1 MB; this does not look like a drive log`,
            line + 1,
          );
        return;
      }
      const joined = concat(carry, b.subarray(0, nl < 0 ? b.length : nl));
      carry = new Uint8Array(0);
      readLine(joined, 0, joined.length, nl < 0);
      s = nl < 0 ? b.length : nl + 1;
    }
    const lastNl = b.lastIndexOf(10);
    if (lastNl >= s && !error) s = scanBlock(b, s, lastNl + 1);
    if (error) return;
    if (atEnd && s < b.length) readLine(b, s, b.length, true);
    else if (s < b.length) carry = b.slice(s);
  }

  return {
    feed,
    get error() {
      return error;
    },
    get rows() {
      return n;
    },
    skipped,
  };
}
