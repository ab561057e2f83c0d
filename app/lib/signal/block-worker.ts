/**
 * The block helper's thread (block-helper.ts), one job at a time: a read job's byte range
 * (ingest-range.ts) onto the job's port; a block job's blocks (order-tracking.ts trackRange) or
 * a low-pass job's filtered channel into the job's shared arrays; a transients job's spans and
 * then the results of the spans it claimed (transient-analysis.ts) onto the job's port. Every
 * job but the read then wakes the caller waiting on its control word.
 */
import { parentPort } from "node:worker_threads";
import { integrateAngle } from "./angle-grid.ts";
import type {
  AngleJob,
  BlockJob,
  HelperRangeJob,
  LowpassJob,
  TransientJob,
} from "./block-helper.ts";
import { readRangeJob } from "./ingest-range.ts";
import { filtfilt } from "./lowpass.ts";
import { trackRange } from "./order-tracking.ts";
import {
  measureSpanWork,
  transientSpans,
  type AngleCache,
  type SpanResult,
  type SpanWork,
} from "./transient-analysis.ts";

function runBlocks(job: BlockJob): void {
  const { control, out } = job;
  const r = trackRange(job.args, job.from, job.to, job.warmFrom);
  out.crankAmp.set(r.crankAmp);
  out.gearboxAmp.set(r.gearboxAmp);
  out.blockRadS.set(r.blockRadS);
  out.blockStartS.set(r.blockStartS);
  out.blockEndS.set(r.blockEndS);
  if (out.twistRadS && r.twistRadS) out.twistRadS.set(r.twistRadS);
  control[1] = r.blockCount;
  control[2] = r.droppedSlowBlocks;
  [control[3], control[4]] = r.samplesPerRevRange;
}

function runTransients(job: TransientJob): void {
  const { args, control, port } = job;
  let works: SpanWork[] = [];
  const cache: AngleCache = new Map();
  try {
    works = transientSpans(args, cache);
    // Posted before the count is stored, so the caller's receiveMessageOnPort finds them.
    port.postMessage(works);
  } finally {
    Atomics.store(control, 2, works.length); // 0 when finding them failed: the caller stops waiting
    Atomics.notify(control, 2);
  }
  const mine: [number, SpanResult][] = [];
  for (let k = Atomics.add(control, 1, 1); k < works.length; k = Atomics.add(control, 1, 1))
    mine.push([k, measureSpanWork(args, works[k]!, cache)]);
  port.postMessage(mine); // before the wake-up, like the spans
}

function runRange(job: HelperRangeJob): void {
  try {
    const { reply, buffers } = readRangeJob(job);
    job.port.postMessage(reply, buffers);
  } catch {
    job.port.postMessage(undefined);
  }
}

type Job = AngleJob | BlockJob | HelperRangeJob | LowpassJob | TransientJob;

parentPort?.on("message", (job: Job) => {
  if (job.kind === "range") return runRange(job);
  const { control } = job;
  try {
    if (job.kind === "transients") runTransients(job);
    else if (job.kind === "lowpass") filtfilt(job.x, job.sections, job.out);
    else if (job.kind === "angle") integrateAngle(job.timeS, job.radS, job.out);
    else runBlocks(job);
    Atomics.store(control, 0, 1);
  } catch {
    Atomics.store(control, 0, 2);
  }
  Atomics.notify(control, 0);
});
