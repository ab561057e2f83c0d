/**
 * The CSV ingest on two threads, for a large file on disk: the head is read as the whole-file
 * ingest reads it (ingest.ts, csv-head.ts), the data split at the first line boundary after
 * MAIN_SHARE of it, the rest read by the CLI's helper thread (block-helper.ts helpedRange) while
 * this thread reads the first part (both with ingest-range.ts, i.e. the same row reader), then the
 * columns joined and the log finished as ingest.ts finishes it, with the stats pass gathered per
 * half (ingest-checks.ts joinStats). The result is the same DriveLog and warnings.
 *
 * Anything out of the ordinary — no helper running, a problem in either half, a row warning,
 * time not increasing across the seam, a helper that fails — and the file is read again by the
 * one-thread ingest (ingestFile), so messages and row numbers are always that ingest's. Small
 * files and MDF4 go there directly. Measured on the 92 MB bench log (bench/cli.bench.ts): see
 * docs/signal-ingest.md.
 */
import { open, stat } from "node:fs/promises";
import { helpedRange } from "./block-helper.ts";
import { createHeadCollector } from "./csv-head.ts";
import { sniffFormat } from "./format.ts";
import { buildDriveLog } from "./ingest-channels.ts";
import { columnStats, joinStats } from "./ingest-checks.ts";
import { finishLog } from "./ingest-finish.ts";
import { resolveHead } from "./ingest-header.ts";
import { readRange, RANGE_CHUNK_BYTES, type RangeLimits } from "./ingest-range.ts";
import { ingestFile, type ByteProgress } from "./ingest-stream.ts";
import type { IngestOptions } from "./ingest.ts";
import { rateMismatch } from "./stated-rate.ts";
import type { DriveLog, Outcome, SignalIssue } from "./types.ts";

/**
 * This thread's share of the data bytes: a little over half, as the helper thread starts reading
 * about 0.1 s later (its start-up; measured on the bench log, docs/performance.md).
 */
export const MAIN_SHARE = 0.55;

/** Below this size one thread is as fast (handing a job over takes a few ms). */
export const PARALLEL_MIN_BYTES = 4 << 20;

/**
 * Ingest the CSV or MDF4 file at `path`: two threads when it is a CSV of at least
 * PARALLEL_MIN_BYTES and the helper thread runs, else ingestFile. Same options, result and
 * progress as ingestFile.
 */
export async function ingestFileParallel(
  path: string,
  options: IngestOptions = {},
  onProgress?: ByteProgress,
): Promise<Outcome<DriveLog>> {
  return (await ingestInTwo(path, options, onProgress)) ?? ingestFile(path, options, onProgress);
}

/**
 * The two-thread read of a CSV file of at least `minBytes`, or undefined when the file is not
 * one for it (small, MDF4, unreadable), no helper thread runs (startBlockHelper), or anything
 * in it needs the one-thread ingest's words.
 */
export async function ingestInTwo(
  path: string,
  options: IngestOptions = {},
  onProgress?: ByteProgress,
  minBytes = PARALLEL_MIN_BYTES,
): Promise<Outcome<DriveLog> | undefined> {
  let size: number;
  let first: Uint8Array;
  try {
    const s = await stat(path);
    if (!s.isFile() || s.size < Math.max(minBytes, RANGE_CHUNK_BYTES)) return undefined;
    size = s.size;
    // The first read of the one-thread ingest, byte for byte: the head is decided on it.
    first = new Uint8Array(RANGE_CHUNK_BYTES);
    const fh = await open(path, "r");
    try {
      await fh.read(first, 0, first.length, 0);
    } finally {
      await fh.close();
    }
  } catch {
    return undefined; // the one-thread ingest names the problem
  }
  if (sniffFormat(first.subarray(0, 8)) !== "csv") return undefined;
  const collector = createHeadCollector(options);
  const head = collector.push(first);
  const resolved = head?.ok ? resolveHead(head.value, options) : undefined;
  if (!resolved?.ok) return undefined;
  const header = resolved.value;
  const dataStart = header.dataStart;
  // Split at the first line start after this thread's share of the data.
  const mid = dataStart + Math.floor((size - dataStart) * MAIN_SHARE);
  const probe = new Uint8Array(1 << 16);
  const fh = await open(path, "r");
  let got: number;
  try {
    ({ bytesRead: got } = await fh.read(probe, 0, probe.length, mid));
  } finally {
    await fh.close();
  }
  const nl = probe.subarray(0, got).indexOf(10);
  if (nl < 0) return undefined;
  const split = mid + nl + 1;
  if (split >= size) return undefined;

  const limits: RangeLimits = {
    maxRpm: options.maxRpm ?? 12000,
    minRpm: options.minRpm ?? -20,
    strict: options.strict === true,
  };
  // The row reader counts file lines from the line before the data (the units row, if any).
  const rowsFrom = { ...header, headerLine: header.lastHeadLine };
  const second = helpedRange({ path, from: split, to: size, header: rowsFrom, limits });
  if (!second) return undefined;
  onProgress?.(0);
  const a = readRange(path, dataStart, split, rowsFrom, limits, size);
  onProgress?.(0.5);
  const ch = a.channels;
  // The stats pass of this half while the helper reads the other (it sends its half's).
  const aStats = columnStats(ch.t.take(a.n), ch.crank.take(a.n), ch.gear.take(a.n));
  const b = await second;
  if (!b || b.failed || b.warnings > 0 || a.error || a.warnings.length > 0) return undefined;
  const n = a.n + b.n;
  if (a.n === 0 || b.n === 0 || !(b.t[0]! > ch.t.data[a.n - 1]!)) return undefined;
  const last = a.n - 1;
  const stats = joinStats(
    aStats,
    b.stats,
    ch.t.data[last]!,
    ch.crank.data[last]!,
    b.t[0]!,
    b.crank[0]!,
  );
  const columns = [ch.t, ch.crank, ch.gear, ...ch.extras];
  const parts = [b.t, b.crank, b.gear, ...b.extras];
  columns.forEach((c, k) => {
    while (c.data.length < n) c.ensure(c.data.length);
    c.data.set(parts[k]!, a.n);
  });
  onProgress?.(1);
  // As ingest.ts finish(): row of each sample, whole-log checks and repairs, stated rate.
  const skipped = [...a.skipped, ...b.skipped.map((k) => k + a.n)];
  const firstDataLine = header.lastHeadLine + 1;
  const rowOf = (i: number) => firstDataLine + i + skipped.filter((k) => k <= i).length;
  const finished = finishLog(buildDriveLog(ch, n, header), rowOf, options, stats);
  const stated = finished.ok ? rateMismatch(header.statedRateHz, finished.value) : [];
  const warnings: SignalIssue[] = [...header.warnings];
  return { ...finished, warnings: [...warnings, ...finished.warnings, ...stated] };
}
