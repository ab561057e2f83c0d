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
 * Every problem is a value with a code, a row (1-based file line, preamble lines counted) and a
 * column.
 * This file drives the steps chunk by chunk: 1. read the head — a logger's preamble, the header
 * and a units row under it (csv-head.ts, ingest-header.ts, ingest-preamble.ts); 2. scan the
 * rows (ingest-rows.ts, with the byte scanner in ingest-scan.ts); 3. check each row
 * (ingest-row-checks.ts) and, after the last, the whole log (ingest-checks.ts: sampling,
 * length, clipping); 4. build the channels and the DriveLog (ingest-channels.ts).
 */
import { buildDriveLog, createChannels, type Channels } from "./ingest-channels.ts";
import { finishLog, type FinishOptions } from "./ingest-finish.ts";
import { createHeadCollector, type HeadResult } from "./csv-head.ts";
import { resolveHead, type HeaderOptions, type LogHeader } from "./ingest-header.ts";
import { createRowReader, type RowReader } from "./ingest-rows.ts";
import { parseNumberText } from "./ingest-scan.ts";
import { rateMismatch } from "./stated-rate.ts";
import type { DriveLog, Outcome, SignalIssue } from "./types.ts";

export { parseNumberText };
export type { FinishOptions };

export interface IngestOptions extends HeaderOptions, FinishOptions {
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
  const limits = {
    maxRpm: options.maxRpm ?? 12000,
    minRpm: options.minRpm ?? -20,
    strict: options.strict === true,
  };
  let error: SignalIssue | undefined; // a problem of the header or of the log as a whole
  let header: LogHeader | undefined;
  let channels: Channels | undefined;
  let reader: RowReader | undefined;
  // The head (preamble, header, units row, first data rows) is collected until it can be
  // decided (csv-head.ts); then the rows go straight to the row reader.
  const collector = createHeadCollector(options);
  let head = true;
  const failed = () => error ?? reader?.error;

  function startData(read: HeadResult, atEnd: boolean): void {
    head = false;
    const prefix = collector.take();
    const resolved = read.ok ? resolveHead(read.value, options) : read;
    if (!resolved.ok) {
      error = resolved.error;
      return;
    }
    header = resolved.value;
    warnings.push(...header.warnings);
    channels = createChannels(header, options.sizeHintBytes);
    // The row reader counts file lines from the line before the data (the units row, if any).
    const rowsFrom = { ...header, headerLine: header.lastHeadLine };
    reader = createRowReader(rowsFrom, channels, limits, warnings);
    reader.feed(prefix.subarray(header.dataStart), atEnd);
  }

  function push(chunk: string | Uint8Array): void {
    if (failed()) return;
    // One array type for every chunk (not Buffer here, Uint8Array there) keeps the scanner's
    // element access monomorphic.
    const bytes =
      typeof chunk === "string"
        ? new TextEncoder().encode(chunk)
        : new Uint8Array(chunk.buffer, chunk.byteOffset, chunk.byteLength);
    if (head) {
      const read = collector.push(bytes);
      if (read) startData(read, false);
      return;
    }
    reader?.feed(bytes, false);
  }

  function finish(): Outcome<DriveLog> {
    if (!failed() && head) startData(collector.finish(), true);
    else if (!failed()) reader?.feed(new Uint8Array(0), true);
    if (!failed() && header && reader?.rows === 0)
      error = {
        code: "no_data_rows",
        message: "the file has a header but no data rows",
        row: header.lastHeadLine + 1,
      };
    const problem = failed();
    if (problem || !header || !channels || !reader)
      return {
        ok: false,
        error: problem ?? { code: "empty_file", message: "the file is empty" },
        warnings,
      };
    const { rows: n, skipped } = reader;
    const firstDataLine = header.lastHeadLine + 1;
    const rowOf = (i: number) => firstDataLine + i + skipped.filter((k) => k <= i).length;
    const finished = finishLog(buildDriveLog(channels, n, header), rowOf, options);
    const stated = finished.ok ? rateMismatch(header.statedRateHz, finished.value) : [];
    return { ...finished, warnings: [...warnings, ...finished.warnings, ...stated] };
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
