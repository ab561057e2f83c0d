/**
 * The second thread of the two-thread CSV ingest (ingest-parallel.ts): reads its byte range of
 * the file (ingest-range.ts) and posts the columns back, their buffers transferred, not copied.
 */
import { parentPort, workerData } from "node:worker_threads";
import type { LogHeader } from "./ingest-header.ts";
import { readRange, type RangeLimits } from "./ingest-range.ts";

/** What the main thread hands over (workerData). */
export interface RangeJob {
  path: string;
  from: number;
  to: number;
  header: LogHeader;
  limits: RangeLimits;
}

/** What the worker posts back: the first n values of each column, and the reader's findings. */
export interface RangeReply {
  n: number;
  t: Float64Array;
  crank: Float64Array;
  gear: Float64Array;
  extras: Float64Array[];
  skipped: number[];
  failed: boolean;
  warnings: number;
}

const job = workerData as RangeJob;
const r = readRange(job.path, job.from, job.to, job.header, job.limits, job.to - job.from);
const cols = [r.channels.t, r.channels.crank, r.channels.gear, ...r.channels.extras];
const [t, crank, gear, ...extras] = cols.map((c) => c.take(r.n));
const reply: RangeReply = {
  n: r.n,
  t: t!,
  crank: crank!,
  gear: gear!,
  extras,
  skipped: r.skipped,
  failed: r.error !== undefined,
  warnings: r.warnings.length,
};
parentPort?.postMessage(
  reply,
  cols.map((c) => c.data.buffer as ArrayBuffer),
);
