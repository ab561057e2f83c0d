/**
 * CSV drive-log ingest: header row, delimiter `,` `;` or tab, decimal point or comma, time in
 * s or ms, angular velocity in rpm, rad/s, deg/s or rev/s → a DriveLog in s and rad/s.
 *
 * Papaparse reads the header, decides the delimiter on the first lines and splits any line with
 * quotes. Plain numeric lines — nearly all of a logger's output — go through a byte scanner
 * that writes straight into growing Float64Arrays: papaparse plus Number() on every field took
 * 4.4 s for the 90 MB benchmark log, the scanner 0.5 s (bench/analyse.bench.ts). The scanner
 * is conservative: any field it is not sure of (exponent, spaces, more than 15 digits, text)
 * falls back to the careful path, and the tests hold it against papaparse + Number().
 *
 * Every problem is a value with a code, a row (1-based file line, header = 1) and a column.
 * The scanner is in ingest-scan.ts, the whole-log checks (sampling, length, clipping) in
 * ingest-checks.ts; this file drives them chunk by chunk.
 */
import Papa from "papaparse";
import { resolveColumns, type ColumnMap, type ColumnOptions } from "./columns.ts";
import { checkLog, type CheckOptions } from "./ingest-checks.ts";
import {
  bytesToText,
  Column,
  concat,
  detectDecimal,
  detectDelimiter,
  EMPTY,
  firstControlByte,
  fmt,
  MAX_LINE_BYTES,
  NONFINITE,
  OK,
  parseNumberText,
  POW10,
  SAMPLE_LINES,
  scanLine,
  TWO53,
  type RowScratch,
} from "./ingest-scan.ts";
import type { DriveLog, Outcome, SignalIssue } from "./types.ts";
import { RAD_S_PER_UNIT, S_PER_UNIT } from "./units.ts";

export { parseNumberText };
export type { CheckOptions };

export interface IngestOptions extends ColumnOptions, CheckOptions {
  /** Field delimiter; detected from the first lines when not given. */
  delimiter?: "," | ";" | "\t";
  /** Decimal mark; detected from the first data lines when not given ("." with a "," delimiter). */
  decimal?: "." | ",";
  /** Highest plausible speed of either channel in rpm (default 12000). */
  maxRpm?: number;
  /** Lowest plausible speed in rpm (default −20: sensor noise at standstill is not an error). */
  minRpm?: number;
  /** Expected input size in bytes, so the arrays can be sized once instead of grown. */
  sizeHintBytes?: number;
}

/**
 * Feeds a file chunk by chunk; `finish()` returns the DriveLog or the first problem. A pushed
 * chunk may be reused by the caller once push returns (whatever is kept is copied).
 */
export interface Ingester {
  push(chunk: string | Uint8Array): void;
  finish(): Outcome<DriveLog>;
}

/** A chunked ingester; feed it with push() and call finish() once. Options as IngestOptions. */
export function createIngester(options: IngestOptions = {}): Ingester {
  const warnings: SignalIssue[] = [];
  const maxRpm = options.maxRpm ?? 12000;
  const minRpm = options.minRpm ?? -20;
  let error: SignalIssue | undefined;
  let head = true; // still collecting the first lines, before the header is decided
  let headParts: Uint8Array[] = [];
  let headBytes = 0;
  let headLines = 0;
  const takeHead = (): Uint8Array => {
    const all = new Uint8Array(headBytes);
    let at = 0;
    for (const part of headParts) {
      all.set(part, at);
      at += part.length;
    }
    head = false;
    headParts = [];
    return all;
  };
  let carry: Uint8Array = new Uint8Array(0);
  let line = 0; // file line number of the last line read
  let firstDataLine = 0;
  const skipped: number[] = []; // data indices before which a blank line was skipped
  let headers: string[] = [];
  let map: ColumnMap | undefined;
  let delimiter = ",";
  let decimal: "." | "," = ".";
  let delimByte = 44,
    decByte = 46;
  let n = 0;
  let t: Column, crank: Column, gear: Column;
  let extras: Column[] = [];
  let row: RowScratch = { vals: new Float64Array(0), stat: new Uint8Array(0), texts: [] };
  let prevTime = NaN;
  let scaleT = 1,
    toRpmC = 1,
    toRpmG = 1,
    radC = 1,
    radG = 1;

  const fail = (code: string, message: string, r?: number, column?: string) => {
    error ??= {
      code,
      message,
      ...(r !== undefined ? { row: r } : {}),
      ...(column !== undefined ? { column } : {}),
    };
  };

  function startData(prefix: Uint8Array, atEnd: boolean): void {
    let p = 0;
    if (prefix[0] === 0xef && prefix[1] === 0xbb && prefix[2] === 0xbf) p = 3;
    if ((prefix[0] === 0xff && prefix[1] === 0xfe) || (prefix[0] === 0xfe && prefix[1] === 0xff)) {
      return fail("not_text", "the file is UTF-16 text; save it as UTF-8 or plain ASCII CSV", 1);
    }
    const lines: string[] = [];
    let headerEnd = -1;
    let sampleLine = 0;
    if (!atEnd && prefix.indexOf(10, p) < 0) {
      const bad = firstControlByte(prefix, p, prefix.length);
      if (bad >= 0)
        return fail(
          "not_text",
          `the file is not text: control byte 0x${bad.toString(16).padStart(2, "0")} in row 1`,
          1,
        );
      return fail(
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
        return fail(
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
    if (lines.length === 0) return fail("empty_file", "the file is empty");
    if (prefix.indexOf(10) < 0 && prefix.indexOf(13) >= 0)
      return fail(
        "unsupported_line_endings",
        "lines end in CR only; save the file with LF or CRLF line endings",
        1,
      );
    delimiter = detectDelimiter(lines, options.delimiter);
    decimal = options.decimal ?? detectDecimal(lines, delimiter);
    if (delimiter === "," && decimal === ",")
      return fail("ambiguous_decimal", "a decimal comma cannot be used with a comma delimiter", 1);
    delimByte = delimiter.charCodeAt(0);
    decByte = decimal.charCodeAt(0);
    headers = (Papa.parse<string[]>(lines[0] ?? "", { delimiter }).data[0] ?? []).map((h) =>
      h.trim(),
    );
    if (headers.length > 1 && headers[headers.length - 1] === "") headers.pop();
    const resolved = resolveColumns(headers, options);
    if (!resolved.ok) {
      error = { ...resolved.error, row: line };
      return;
    }
    warnings.push(...resolved.warnings.map((w) => ({ ...w, row: line })));
    map = resolved.map;
    firstDataLine = line + 1;
    // From the first data line; numbers grow longer through a log, so this errs high, which
    // costs no memory: pages of the unused tail are never touched and never resident.
    const guessRows = options.sizeHintBytes
      ? Math.ceil((options.sizeHintBytes / Math.max(1, (lines[1] ?? "").length + 1)) * 1.05) + 16
      : 4096;
    const sized = options.sizeHintBytes !== undefined;
    [t, crank, gear] = [0, 1, 2].map(() => new Column(guessRows, sized)) as [
      Column,
      Column,
      Column,
    ];
    extras = map.extra.map(() => new Column(guessRows, sized));
    row = {
      vals: new Float64Array(headers.length + 1),
      stat: new Uint8Array(headers.length + 1),
      texts: [],
    };
    scaleT = S_PER_UNIT[map.timeUnit];
    radC = RAD_S_PER_UNIT[map.crankUnit];
    radG = RAD_S_PER_UNIT[map.gearboxUnit];
    toRpmC = radC / RAD_S_PER_UNIT.rpm;
    toRpmG = radG / RAD_S_PER_UNIT.rpm;
    feedData(prefix.subarray(headerEnd < 0 ? prefix.length : headerEnd), atEnd);
  }

  /** Check and store the row in `row` (f fields) read from file line r. */
  function commit(f: number, r: number, last: boolean): void {
    const m = map as ColumnMap;
    const cols = headers.length;
    if (f !== cols && !(f === cols + 1 && row.stat[cols] === EMPTY)) {
      if (last && f < cols) {
        warnings.push({
          code: "truncated_last_row",
          message: `the last row (row ${r}) has ${f} of ${cols} fields and was left out`,
          row: r,
        });
        return;
      }
      return fail("wrong_field_count", `row ${r} has ${f} fields but the header has ${cols}`, r);
    }
    const st = row.stat;
    // Fast path: a clean row allocates nothing; the loops below only run on a problem.
    if (((st[m.time] ?? 0) | (st[m.crank] ?? 0) | (st[m.gearbox] ?? 0)) !== OK)
      for (const [i, what] of [
        [m.time, "time"],
        [m.crank, "crank speed"],
        [m.gearbox, "gearbox speed"],
      ] as const) {
        const s = row.stat[i];
        if (s === OK) continue;
        const name = headers[i] ?? "";
        const text = row.texts[i] ?? "";
        if (s === EMPTY)
          return fail("missing_value", `row ${r}, column "${name}": the ${what} is empty`, r, name);
        if (s === NONFINITE)
          return fail(
            "non_finite",
            `row ${r}, column "${name}": the ${what} "${text.trim()}" is not a finite number`,
            r,
            name,
          );
        // A decimal comma the first rows did not show (they held whole numbers) is the usual cause.
        const hint =
          decimal === "." && /^\s*[+-]?\d+,\d+\s*$/.test(text)
            ? ' (for decimal commas set the decimal mark to ",")'
            : "";
        return fail(
          "not_numeric",
          `row ${r}, column "${name}": "${text.trim()}" is not a number${hint}`,
          r,
          name,
        );
      }
    const rawT = row.vals[m.time] ?? NaN;
    if (n > 0 && !(rawT > prevTime)) {
      const u = m.timeUnit;
      const name = headers[m.time];
      if (rawT === prevTime)
        return fail(
          "time_not_increasing",
          `time repeats at row ${r} (${fmt(rawT)} ${u} twice)`,
          r,
          name,
        );
      return fail(
        "time_not_increasing",
        `time goes backwards at row ${r} (${fmt(rawT)} ${u} after ${fmt(prevTime)} ${u})`,
        r,
        name,
      );
    }
    const rawC = row.vals[m.crank] ?? NaN;
    const rawG = row.vals[m.gearbox] ?? NaN;
    const rpmC = rawC * toRpmC;
    const rpmG = rawG * toRpmG;
    const plausible = rpmC >= minRpm && rpmC <= maxRpm && rpmG >= minRpm && rpmG <= maxRpm;
    if (!plausible)
      for (const [raw, toRpm, i, unit] of [
        [rawC, toRpmC, m.crank, m.crankUnit],
        [rawG, toRpmG, m.gearbox, m.gearboxUnit],
      ] as const) {
        const rpm = raw * toRpm;
        if (rpm >= minRpm && rpm <= maxRpm) continue;
        const name = headers[i] ?? "";
        const why = rpm < 0 ? "negative" : `above ${maxRpm} rpm`;
        return fail(
          "implausible_speed",
          `row ${r}, column "${name}": speed ${fmt(raw)} ${unit} is implausible (${why})`,
          r,
          name,
        );
      }
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
   * line took the parse from about 0.8 s to the figure the bench prints.
   */
  function scanBlock(b: Uint8Array, s: number, e: number): number {
    const m = map as ColumnMap;
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
        if (c === 13 && b[i + 1] === 10) c = b[++i]!; // CR only as part of CRLF
        let plain = true;
        if (c !== delim && c !== 10) {
          plain = false; // anything else in the field: the careful path reads it
          while (c !== delim && c !== 10) c = b[++i]!;
        }
        if (plain && nd > 0 && mant < TWO53 && frac <= 22 && f < cols) {
          const v = frac > 0 ? mant / POW10[frac]! : mant;
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
        (rawT > prevTime || n === 0) &&
        rawC >= loC &&
        rawC <= hiC &&
        rawG >= loG &&
        rawG <= hiG;
      if (!fine) {
        readLine(b, ls, i, false); // re-reads the line carefully and names the problem, if any
        if (error) return e;
        tA = t.data;
        cA = crank.data;
        gA = gear.data;
        xA = extras.map((x) => x.data);
      } else {
        line++;
        if (n >= tA.length) {
          for (const col of [t, crank, gear, ...extras]) col.ensure(n);
          tA = t.data;
          cA = crank.data;
          gA = gear.data;
          xA = extras.map((x) => x.data);
        }
        tA[n] = rawT * scaleT;
        cA[n] = rawC * radC;
        gA[n] = rawG * radG;
        for (let k = 0; k < nx; k++) xA[k]![n] = vals[xIdx[k]!]!;
        prevTime = rawT;
        n++;
      }
      i++;
    }
    return e;
  }

  /** Read every complete line of b (and the rest too when atEnd). */
  function feedData(b: Uint8Array, atEnd: boolean): void {
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

  function push(chunk: string | Uint8Array): void {
    if (error) return;
    // One array type for every chunk (not Buffer here, Uint8Array there) keeps the scanner's
    // element access monomorphic.
    const bytes =
      typeof chunk === "string"
        ? new TextEncoder().encode(chunk)
        : new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength);
    if (head) {
      // Pieces are kept in a list (not concatenated per push) so tiny pushes stay linear.
      headParts.push(bytes.slice()); // a copy: the caller may reuse its buffer
      headBytes += bytes.length;
      for (
        let i = bytes.indexOf(10);
        i >= 0 && headLines <= SAMPLE_LINES;
        i = bytes.indexOf(10, i + 1)
      )
        headLines++;
      if (headLines > SAMPLE_LINES || headBytes > 1 << 16) startData(takeHead(), false);
      return;
    }
    feedData(bytes, false);
  }

  function finish(): Outcome<DriveLog> {
    if (!error && head) startData(takeHead(), true);
    else if (!error) feedData(new Uint8Array(0), true);
    if (!error && n === 0)
      fail("no_data_rows", "the file has a header but no data rows", firstDataLine);
    if (error || !map)
      return {
        ok: false,
        error: error ?? { code: "empty_file", message: "the file is empty" },
        warnings,
      };
    const m = map;
    const rowOf = (i: number) => firstDataLine + i + skipped.filter((k) => k <= i).length;
    const log: DriveLog = {
      timeS: t.take(n),
      crankRadS: crank.take(n),
      gearboxRadS: gear.take(n),
      extra: {},
      sampleRateHz: n > 1 ? (n - 1) / ((t.data[n - 1] ?? 0) - (t.data[0] ?? 0)) : 0,
      source: {
        rows: n,
        delimiter,
        decimal,
        timeColumn: headers[m.time] ?? "",
        crankColumn: headers[m.crank] ?? "",
        gearboxColumn: headers[m.gearbox] ?? "",
        timeUnit: m.timeUnit,
        crankUnit: m.crankUnit,
        gearboxUnit: m.gearboxUnit,
      },
    };
    m.extra.forEach((e, k) => {
      const values = (extras[k] as Column).take(n);
      if (values.some((v) => !Number.isNaN(v))) log.extra[e.name] = values;
    });
    const checked = checkLog(log, rowOf, options);
    warnings.push(...checked.warnings);
    if (checked.error) return { ok: false, error: checked.error, warnings };
    return { ok: true, value: log, warnings };
  }

  return { push, finish };
}

/** Ingest a whole file held in memory (text or bytes). Options as IngestOptions. */
export function ingestCsv(
  input: string | Uint8Array,
  options: IngestOptions = {},
): Outcome<DriveLog> {
  const ingester = createIngester(options);
  ingester.push(input);
  return ingester.finish();
}
