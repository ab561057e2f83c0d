/**
 * The rows of one byte range of a CSV drive log, read by the same row reader as the whole-file
 * ingest (ingest-rows.ts createRowReader, into ingest-channels.ts columns): the piece of work
 * the two-thread ingest (ingest-parallel.ts) gives each thread. Units as the row reader: s and
 * rad/s on store.
 */
import { closeSync, openSync, readSync } from "node:fs";
import { createChannels, type Channels } from "./ingest-channels.ts";
import { columnStats, type Stats } from "./ingest-checks.ts";
import type { LogHeader } from "./ingest-header.ts";
import { createRowReader } from "./ingest-rows.ts";
import type { SignalIssue } from "./types.ts";

/** Read size: the whole-file ingest's (ingest-stream.ts). */
export const RANGE_CHUNK_BYTES = 1 << 18;

export interface RangeLimits {
  minRpm: number;
  maxRpm: number;
  strict?: boolean;
}

/** The later part of a two-thread ingest, as the main thread hands it over (block-helper.ts). */
export interface RangeJob {
  path: string;
  from: number;
  to: number;
  header: LogHeader;
  limits: RangeLimits;
}

/** What the helper hands back: the first n values of each column, and the reader's findings. */
export interface RangeReply {
  n: number;
  t: Float64Array;
  crank: Float64Array;
  gear: Float64Array;
  extras: Float64Array[];
  skipped: number[];
  failed: boolean;
  warnings: number;
  /** columnStats of the rows, gathered while they are at hand. */
  stats: Stats;
}

/** What one range gave: its channels (n rows), blank or dropped rows, and any problem. */
export interface RangeRows {
  channels: Channels;
  n: number;
  skipped: number[];
  error: SignalIssue | undefined;
  warnings: SignalIssue[];
}

/**
 * Reads bytes [from, to) of the file at `path`, whole lines (from is a line start), as the data
 * rows of `header` (its headerLine: the line before the data). `sizeHintBytes` sizes the
 * channels. Line numbers in messages count from the range's start, so a caller that splits a
 * file reads them as relative.
 */
export function readRange(
  path: string,
  from: number,
  to: number,
  header: LogHeader,
  limits: RangeLimits,
  sizeHintBytes: number,
): RangeRows {
  const warnings: SignalIssue[] = [];
  const channels = createChannels(header, sizeHintBytes);
  const reader = createRowReader(header, channels, limits, warnings);
  const buf = new Uint8Array(RANGE_CHUNK_BYTES);
  const fd = openSync(path, "r");
  try {
    for (let at = from; at < to && !reader.error;) {
      const got = readSync(fd, buf, 0, Math.min(buf.length, to - at), at);
      if (got === 0) break;
      reader.feed(buf.subarray(0, got), false);
      at += got;
    }
  } finally {
    closeSync(fd);
  }
  if (!reader.error) reader.feed(new Uint8Array(0), true);
  return { channels, n: reader.rows, skipped: [...reader.skipped], error: reader.error, warnings };
}

/**
 * readRange for a RangeJob, packed as its reply; `buffers` are the columns' memory, for a
 * postMessage transfer list (the values are not copied).
 */
export function readRangeJob(job: RangeJob): { reply: RangeReply; buffers: ArrayBuffer[] } {
  const r = readRange(job.path, job.from, job.to, job.header, job.limits, job.to - job.from);
  const cols = [r.channels.t, r.channels.crank, r.channels.gear, ...r.channels.extras];
  const [t, crank, gear, ...extras] = cols.map((c) => c.take(r.n));
  return {
    reply: {
      n: r.n,
      t: t!,
      crank: crank!,
      gear: gear!,
      extras,
      skipped: r.skipped,
      failed: r.error !== undefined,
      warnings: r.warnings.length,
      stats: columnStats(t!, crank!, gear!),
    },
    buffers: cols.map((c) => c.data.buffer as ArrayBuffer),
  };
}
