/**
 * The data rows of a CSV log handed on in windows instead of kept whole (the spooled ingest,
 * ingest-samples.ts; docs/signal-ingest.md, "Spooled ingest"). It drives the same row reader as
 * the batch ingest (ingest-rows.ts), so every row is checked and converted alike, but a reader
 * stores at most a few tens of thousands of rows: then the rows go to the sink and a fresh
 * reader takes over.
 *
 * A fresh reader must go on where the last stopped: it is fed only whole lines (a line cut by a
 * chunk is kept here until its end arrives), it counts file lines from the last one read, and it
 * first reads an "anchor" — a line written here with the last stored row's time, crank and
 * gearbox values (the shortest text that reads back as the same double, ECMA-262
 * Number::toString) — so its time-order check compares with the right row. The anchor is
 * stored again as the reader's row 0 and not handed on. The reader's columns hold the values as
 * written (scale 1); they are converted here with the same multiplication the reader would do.
 */
import type { Channels } from "./ingest-channels.ts";
import { createChannels } from "./ingest-channels.ts";
import type { LogHeader } from "./ingest-header.ts";
import { createRowReader, type RowReader } from "./ingest-rows.ts";
import { concat, MAX_LINE_BYTES } from "./ingest-scan.ts";
import type { SignalIssue } from "./types.ts";

/** Rows a reader stores before a fresh one takes over. */
export const ROTATE_ROWS = 1 << 15;

/**
 * Receives the rows in order, in s and rad/s: samples [from, to) of the arrays are new; when
 * from ≥ 1, sample from − 1 is the one handed on last (so a window can be folded into running
 * figures that look one sample back).
 */
export type RowSink = (
  t: Float64Array,
  c: Float64Array,
  g: Float64Array,
  from: number,
  to: number,
) => void;

export interface WindowedRows {
  push(bytes: Uint8Array, atEnd: boolean): void;
  readonly error: SignalIssue | undefined;
  /** Rows handed on so far. */
  readonly rows: number;
  /** Row indices before which a blank or dropped line was skipped (as RowReader.skipped). */
  readonly skipped: readonly number[];
}

/** Rows after `header` (its headerLine = the last line before the data) to `sink`. */
export function createWindowedRows(
  header: LogHeader,
  limits: { minRpm: number; maxRpm: number; strict?: boolean },
  warnings: SignalIssue[],
  sink: RowSink,
): WindowedRows {
  // Extra columns are not kept on this path; the reader stores raw values (scale 1).
  const lean: LogHeader = { ...header, map: { ...header.map, extra: [] } };
  const scaled = createChannels(lean);
  const ch: Channels = { ...scaled, scaleT: 1, radC: 1, radG: 1 };
  const { scaleT, radC, radG } = scaled;
  const { headers, map, delimiter, decimal } = header;
  let reader: RowReader = createRowReader(lean, ch, limits, warnings);
  let readerLine = header.headerLine; // the headerLine the current reader counts from
  let off = 0; // row index of the current reader's row 0
  let sent = 0; // the current reader's rows handed on
  let skipSeen = 0; // the current reader's skipped entries copied
  const skipped: number[] = [];
  let tail: Uint8Array = new Uint8Array(0);
  let error: SignalIssue | undefined;
  // Converted rows, with the last one handed on at index 0.
  let t: Float64Array = new Float64Array(1024);
  let c: Float64Array = new Float64Array(1024);
  let g: Float64Array = new Float64Array(1024);
  let any = false;

  function handOn(): void {
    error ??= reader.error;
    const rs = reader.skipped;
    for (; skipSeen < rs.length; skipSeen++) skipped.push(rs[skipSeen]! + off);
    const n = reader.rows;
    if (n <= sent) return;
    const k = n - sent;
    const at = any ? 1 : 0; // index 0 holds the row handed on last, once there is one
    if (t.length < k + 1) {
      [t, c, g] = [t, c, g].map((x) => {
        const y = new Float64Array(k + 1024);
        y[0] = x[0]!;
        return y;
      }) as [Float64Array, Float64Array, Float64Array];
    }
    const [rt, rc, rg] = [ch.t.data, ch.crank.data, ch.gear.data];
    for (let i = 0; i < k; i++) {
      t[at + i] = rt[sent + i]! * scaleT;
      c[at + i] = rc[sent + i]! * radC;
      g[at + i] = rg[sent + i]! * radG;
    }
    sink(t, c, g, at, at + k);
    any = true;
    t[0] = t[at + k - 1]!;
    c[0] = c[at + k - 1]!;
    g[0] = g[at + k - 1]!;
    sent = n;
  }

  /** A fresh reader whose first line is the anchor (the last stored row), when there is one. */
  function rotate(): void {
    const n = reader.rows;
    const lastLine = readerLine + n + reader.skipped.length;
    const total = off + n;
    const rt = ch.t.data[n - 1]!;
    const rc = ch.crank.data[n - 1]!;
    const rg = ch.gear.data[n - 1]!;
    readerLine = lastLine - 1;
    reader = createRowReader({ ...lean, headerLine: readerLine }, ch, limits, warnings);
    const fields = headers.map(() => "0");
    const text = (v: number) => (v === v ? String(v).replace(".", decimal) : "");
    fields[map.time] = text(rt);
    fields[map.crank] = text(rc);
    fields[map.gearbox] = text(rg);
    reader.feed(new TextEncoder().encode(`${fields.join(delimiter)}\n`), false);
    off = total - 1;
    sent = 1;
    skipSeen = 0;
  }

  function feed(b: Uint8Array, atEnd: boolean): void {
    reader.feed(b, atEnd);
    handOn();
    if (!error && reader.rows > ROTATE_ROWS && !atEnd) rotate();
  }

  function push(bytes: Uint8Array, atEnd: boolean): void {
    if (error) return;
    let s = 0;
    if (tail.length > 0) {
      const nl = bytes.indexOf(10);
      if (nl < 0 && !atEnd) {
        if (tail.length + bytes.length > MAX_LINE_BYTES) {
          // The reader words the refusal, with its line number: hand it the same bytes.
          reader.feed(tail, false);
          reader.feed(bytes, false);
          error ??= reader.error;
          return;
        }
        tail = concat(tail, bytes);
        return;
      }
      const end = nl < 0 ? bytes.length : nl + 1;
      const joined = concat(tail, bytes.subarray(0, end));
      tail = new Uint8Array(0);
      feed(joined, atEnd && end === bytes.length);
      s = end;
    }
    if (error) return;
    const lastNl = bytes.lastIndexOf(10);
    if (lastNl >= s) {
      feed(bytes.subarray(s, lastNl + 1), atEnd && lastNl + 1 === bytes.length);
      s = lastNl + 1;
    }
    if (error) return;
    if (atEnd && s < bytes.length) feed(bytes.subarray(s), true);
    else if (s < bytes.length) tail = bytes.slice(s);
  }

  return {
    push,
    get error() {
      return error;
    },
    get rows() {
      return off + reader.rows;
    },
    skipped,
  };
}
