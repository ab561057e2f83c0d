/**
 * The block helper: a worker thread that computes the later half of the order-tracking blocks
 * (order-tracking.ts trackRange) while the calling thread computes the first half, so the
 * second core shares the spectra. Opt-in: the CLI starts it (startBlockHelper); the server's
 * analysis workers never do, and without it trackBlocks runs on one thread as before. It needs
 * the log's arrays in shared memory (shared-arrays.ts); else the blocks stay on one thread.
 *
 * The work is split at the middle of the log's time (a block's cost follows its duration: a
 * slow block has a finer angle grid). The caller waits for the helper with Atomics.wait and
 * computes the helper's blocks itself when the helper fails or does not answer within a minute.
 *
 * The helper also reads the later part of a CSV in the two-thread ingest (helpedRange,
 * ingest-parallel.ts). Before the blocks it can low-pass one channel and integrate the crank
 * angle while the caller low-passes the other and finds the segments (helpedFiltfilt,
 * helpedAngle). Once the blocks are done it finds the transients' fast spans and
 * starts measuring them (transient-analysis.ts, the order filter over each span) while the
 * caller computes the rest of the result; the caller then takes the spans still unclaimed
 * (helpedTransients). Spans and results come back through a message port, read synchronously.
 */
import { createRequire } from "node:module";
import { pathToFileURL } from "node:url";
import {
  MessageChannel,
  type MessagePort,
  receiveMessageOnPort,
  Worker,
} from "node:worker_threads";
import type { RangeJob, RangeReply } from "./ingest-range.ts";
import type { Biquad } from "./lowpass.ts";
import type { TrackArgs, TrackedBlocks } from "./order-tracking.ts";
import {
  measureSpanWork,
  transientPartOf,
  type AngleCache,
  type SpanResult,
  type SpanWork,
  type TransientArgs,
  type TransientPart,
} from "./transient-analysis.ts";
import { allocateShared, allShared } from "./shared-arrays.ts";

let helper: Worker | undefined;
let jobs = 0;

/** Jobs handed to the helper so far (for the tests: the split did happen). */
export function blockHelperJobs(): number {
  return jobs;
}

/** Start the helper (idempotent); arrays allocated from now on are shared. */
export function startBlockHelper(): void {
  if (helper) return;
  if (import.meta.url.endsWith(".ts")) {
    // Under tsx or vitest: the TypeScript source through tsx's API (a worker does not inherit
    // the loader, and `--import tsx` in its execArgv does not take on Node 20).
    const api = createRequire(import.meta.url)
      .resolve("tsx/esm/api")
      .replace(/\.cjs$/, ".mjs");
    const source = new URL("./block-worker.ts", import.meta.url).href;
    helper = new Worker(
      `import(${JSON.stringify(pathToFileURL(api).href)}).then((m) => m.tsImport(${JSON.stringify(source)}, ${JSON.stringify(import.meta.url)}))`,
      { eval: true },
    );
  } else helper = new Worker(new URL("./block-worker.mjs", import.meta.url));
  helper.unref(); // the process may end while it idles
  helper.on("error", () => (helper = undefined));
  allocateShared(true);
}

/** Posts a job to the helper (counted) with the ports it carries. */
function post(job: object, transfer: MessagePort[] = []): void {
  helper!.postMessage(job, transfer);
  jobs++;
}

/** A job's control word [state (0 busy, 1 done, 2 failed), …], `words` long, shared. */
const controlWords = (words: number) => new Int32Array(new SharedArrayBuffer(words * 4));

/**
 * Blocks until the helper has ended the job of `control` (at most a minute); whether it
 * finished. On false the caller computes the job itself.
 */
function finished(control: Int32Array): boolean {
  Atomics.wait(control, 0, 0, 60_000);
  return Atomics.load(control, 0) === 1;
}

/** Stop the helper; arrays are ordinary again. */
export async function stopBlockHelper(): Promise<void> {
  allocateShared(false);
  const h = helper;
  helper = undefined;
  await h?.terminate();
}

/** A block job as posted to the helper (the arrays are shared, the rest is copied). */
export interface BlockJob {
  kind: "blocks";
  args: Omit<TrackArgs, "onProgress">;
  from: number;
  to: number;
  warmFrom: number;
  /** [state (0 busy, 1 done, 2 failed), kept, dropped, S lowest, S highest] */
  control: Int32Array;
  out: {
    crankAmp: Float64Array;
    gearboxAmp: Float64Array;
    blockRadS: Float64Array;
    blockStartS: Float64Array;
    blockEndS: Float64Array;
    twistRadS: Float64Array | undefined;
  };
}

const sharedF64 = (n: number) => new Float64Array(new SharedArrayBuffer(Math.max(1, n) * 8));

/**
 * Hands blocks split…maxBlocks−1 to the helper, or undefined when there is none or the arrays
 * are not shared. `wait()` returns them, or undefined when the caller must compute them.
 */
export function helpedSplit(
  args: TrackArgs,
  maxBlocks: number,
): { from: number; warmFrom: number; wait: () => TrackedBlocks | undefined } | undefined {
  const { timeS, angleRad, crankRadS, gearboxRadS, revsPerBlock: R } = args;
  if (!helper || !allShared(timeS, angleRad, crankRadS, gearboxRadS)) return undefined;
  const hopRad = R * (1 - args.overlap) * 2 * Math.PI;
  const from = Math.min(maxBlocks - 1, Math.floor(angleRad[timeS.length >> 1]! / hopRad));
  // Blocks reuse up to 1/(1−overlap) earlier blocks' samples: resample that many first.
  const warmFrom = Math.max(0, from - Math.ceil(1 / (1 - args.overlap)));
  if (from < 1) return undefined;
  const count = maxBlocks - from;
  const bins = args.topBin + 1;
  const control = controlWords(5);
  const out = {
    crankAmp: sharedF64(count * bins),
    gearboxAmp: sharedF64(count * bins),
    blockRadS: sharedF64(count),
    blockStartS: sharedF64(count),
    blockEndS: sharedF64(count),
    twistRadS: args.firingBin !== undefined ? sharedF64(count) : undefined,
  };
  const { onProgress: _, ...plain } = args;
  const job: BlockJob = {
    kind: "blocks",
    args: plain,
    from,
    to: maxBlocks,
    warmFrom,
    control,
    out,
  };
  post(job);
  const wait = (): TrackedBlocks | undefined => {
    if (!finished(control)) return undefined;
    const kept = control[1]!;
    return {
      revsPerBlock: R,
      orderStep: 1 / R,
      binsPerBlock: bins,
      blockCount: kept,
      blockRadS: out.blockRadS.subarray(0, kept),
      blockStartS: out.blockStartS.subarray(0, kept),
      blockEndS: out.blockEndS.subarray(0, kept),
      crankAmp: out.crankAmp.subarray(0, kept * bins),
      gearboxAmp: out.gearboxAmp.subarray(0, kept * bins),
      ...(out.twistRadS ? { twistRadS: out.twistRadS.subarray(0, kept) } : {}),
      droppedSlowBlocks: control[2]!,
      samplesPerRevRange: kept > 0 ? [control[3]!, control[4]!] : [0, 0],
    };
  };
  return { from, warmFrom, wait };
}

/**
 * A transients job: the helper finds the spans (transientSpans) and posts them on `port`, then
 * measures spans as it claims them, and posts its results [index, result][] when none is left.
 */
export interface TransientJob {
  kind: "transients";
  args: TransientArgs;
  /** controlWords(3): [state, next span to claim, spans found (−1 until posted, 0 on failure)] */
  control: Int32Array;
  port: MessagePort;
}

/**
 * Hands the transients (analyseTransients(args)) to the helper, or undefined when there is none
 * or the log's arrays are not shared. The spans are shared out: the helper claims them one by
 * one as soon as it has found them, and `wait()` claims the rest on this thread, then joins the
 * helper's results with its own. It returns the part, or undefined when the helper failed (the
 * caller then measures it all). Only the three channels, the angle and the sections go over.
 */
export function helpedTransients(
  args: TransientArgs,
): { wait: () => TransientPart | undefined } | undefined {
  const { log, angleRad } = args;
  if (!helper || !allShared(log.timeS, log.crankRadS, log.gearboxRadS)) return undefined;
  if (angleRad && !allShared(angleRad)) return undefined;
  const control = controlWords(3);
  control[2] = -1;
  const { port1, port2 } = new MessageChannel();
  const slim = { ...log, extra: {} };
  const job: TransientJob = {
    kind: "transients",
    args: { ...args, log: slim },
    control,
    port: port2,
  };
  post(job, [port2]);
  return {
    wait: () => {
      Atomics.wait(control, 2, -1, 60_000);
      const works = receiveMessageOnPort(port1)?.message as SpanWork[] | undefined;
      const results: SpanResult[] = [];
      const cache: AngleCache = new Map();
      if (works)
        for (let k = Atomics.add(control, 1, 1); k < works.length; k = Atomics.add(control, 1, 1))
          results[k] = measureSpanWork(args, works[k]!, cache);
      const theirs = works && finished(control) ? receiveMessageOnPort(port1) : undefined;
      port1.close();
      if (!works || !theirs) return undefined;
      for (const [k, r] of theirs.message as [number, SpanResult][]) results[k] = r;
      return transientPartOf(args, results);
    },
  };
}

/** A low-pass job: filtfilt(x, sections) into the shared `out`. */
export interface LowpassJob {
  kind: "lowpass";
  x: Float64Array;
  sections: readonly Biquad[];
  out: Float64Array;
  /** controlWords(1) */
  control: Int32Array;
}

/**
 * Hands filtfilt(x, sections) to the helper, or undefined when there is none or x is not
 * shared. `wait()` returns the filtered copy, or undefined when the caller must filter it.
 */
export function helpedFiltfilt(
  x: Float64Array,
  sections: readonly Biquad[],
): { wait: () => Float64Array | undefined } | undefined {
  if (!helper || !allShared(x)) return undefined;
  return fillJob(x.length, (out, control) => ({ kind: "lowpass", x, sections, out, control }));
}

/**
 * Posts the job `make` gives for a fresh shared array of `length` values to fill; `wait()`
 * returns the array, or undefined when the caller must compute it.
 */
function fillJob(
  length: number,
  make: (out: Float64Array, control: Int32Array) => LowpassJob | AngleJob,
): { wait: () => Float64Array | undefined } {
  const control = controlWords(1);
  const out = sharedF64(length).subarray(0, length);
  post(make(out, control));
  return { wait: () => (finished(control) ? out : undefined) };
}

/** An angle job: integrateAngle(timeS, radS) into the shared `out`. */
export interface AngleJob {
  kind: "angle";
  timeS: Float64Array;
  radS: Float64Array;
  out: Float64Array;
  /** controlWords(1) */
  control: Int32Array;
}

/**
 * Hands integrateAngle(timeS, radS) to the helper, or undefined when there is none or the arrays
 * are not shared. `wait()` returns the angle, or undefined when the caller must integrate it.
 */
export function helpedAngle(
  timeS: Float64Array,
  radS: Float64Array,
): { wait: () => Float64Array | undefined } | undefined {
  if (!helper || !allShared(timeS, radS)) return undefined;
  return fillJob(timeS.length, (out, control) => ({ kind: "angle", timeS, radS, out, control }));
}

/** A read job: readRangeJob in the helper, the reply posted back on `port`. */
export interface HelperRangeJob extends RangeJob {
  kind: "range";
  port: MessagePort;
}

/**
 * Hands the read of a byte range to the helper, or undefined when there is none. The promise
 * gives its reply (columns transferred, not copied), or undefined when the helper failed or
 * ended: the caller then reads the file on one thread.
 */
export function helpedRange(job: RangeJob): Promise<RangeReply | undefined> | undefined {
  if (!helper) return undefined;
  const { port1, port2 } = new MessageChannel();
  const posted: HelperRangeJob = { ...job, kind: "range", port: port2 };
  post(posted, [port2]);
  return new Promise((resolve) => {
    port1.once("message", (reply: RangeReply | undefined) => {
      port1.close();
      resolve(reply);
    });
    port1.once("close", () => resolve(undefined)); // the helper ended without an answer
  });
}
