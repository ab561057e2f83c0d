/**
 * The block helper's thread (block-helper.ts), one job at a time: a read job's byte range
 * (ingest-range.ts) onto the job's port; a block job's blocks (order-tracking.ts trackRange) or
 * a low-pass job's filtered channel into the job's shared arrays; a transients job's part
 * (transient-analysis.ts analyseTransients) onto the job's port. Every job but the read then
 * wakes the caller waiting on its control word.
 */
import { parentPort } from "node:worker_threads";
import type { BlockJob, HelperRangeJob, LowpassJob, TransientJob } from "./block-helper.ts";
import { readRangeJob } from "./ingest-range.ts";
import { filtfilt } from "./lowpass.ts";
import { trackRange } from "./order-tracking.ts";
import { analyseTransients } from "./transient-analysis.ts";

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
  // Posted before the wake-up, so the caller's receiveMessageOnPort finds it.
  job.port.postMessage(analyseTransients(job.args));
}

function runRange(job: HelperRangeJob): void {
  try {
    const { reply, buffers } = readRangeJob(job);
    job.port.postMessage(reply, buffers);
  } catch {
    job.port.postMessage(undefined);
  }
}

parentPort?.on("message", (job: BlockJob | HelperRangeJob | LowpassJob | TransientJob) => {
  if (job.kind === "range") return runRange(job);
  const { control } = job;
  try {
    if (job.kind === "transients") runTransients(job);
    else if (job.kind === "lowpass") filtfilt(job.x, job.sections, job.out);
    else runBlocks(job);
    Atomics.store(control, 0, 1);
  } catch {
    Atomics.store(control, 0, 2);
  }
  Atomics.notify(control, 0);
});
