/**
 * The block helper's thread (block-helper.ts): computes the blocks of each job it is posted
 * (order-tracking.ts trackRange) into the job's shared arrays and wakes the waiting caller.
 */
import { parentPort } from "node:worker_threads";
import type { BlockJob } from "./block-helper.ts";
import { trackRange } from "./order-tracking.ts";

parentPort?.on("message", (job: BlockJob) => {
  const { control, out } = job;
  try {
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
    Atomics.store(control, 0, 1);
  } catch {
    Atomics.store(control, 0, 2);
  }
  Atomics.notify(control, 0);
});
