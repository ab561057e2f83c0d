/**
 * The job runner: claims queued jobs (queue.server.ts) and runs each in a piscina worker pool,
 * never on the request thread (docs/architecture.md §5), keeping its heartbeat and progress,
 * then saves (save.server.ts), fails, retries or hands the job back. A new job wakes the
 * runners of this process at once (wakeRunners); the poll is for jobs queued by other
 * instances and for orphaned ones.
 */
import { randomBytes } from "node:crypto";
import { MessageChannel } from "node:worker_threads";
import { eq } from "drizzle-orm";
import type { Piscina } from "piscina";
import { driveLogs } from "~/lib/infra/db/schema-drive-logs";
import type { LogError } from "../domain/drive-log-terms";
import type { Db } from "../infra/db.server";
import { blobStoreFrom, type BlobStoreDescription } from "../infra/storage.server";
import { chooseColumns } from "./column-choice.server";
import {
  beat,
  claimJob,
  failJob,
  HEARTBEAT_MS,
  recordSettings,
  releaseJob,
  retryJob,
  type ClaimedJob,
} from "./queue.server";
import { saveAnalysis, type BeforeCommit } from "./save.server";
import { ingestOptionsFor } from "./settings";
import type { AnalysisTask, AnalysisTaskOutcome } from "./tasks";

export interface RunnerOptions {
  db: Db;
  pool: Piscina;
  /** The folder of the local blob store, when `store` is not given. */
  blobRoot?: string;
  /** Where raw files are kept; the worker opens the store from this description. */
  store?: BlobStoreDescription;
  /** Jobs run at once by this instance (default: the pool's thread count). */
  concurrency?: number;
  pollMs?: number;
  beforeCommit?: BeforeCommit;
  onError?: (error: unknown) => void;
  /** Called with where each finished job's time went (the server logs it when asked). */
  onTimings?: (timings: JobTimings) => void;
}

/** Where a job's time went, ms (bench/upload.bench.ts prints them as the server's profile). */
export interface JobTimings {
  jobId: number;
  driveLogId: number;
  /** From queueing the job to this claim. */
  queuedMs: number;
  /** Reading the file's head to choose the columns, and recording them. */
  columnsMs: number;
  /** From handing the task to the pool until the worker began it (a cold worker starts here). */
  workerStartMs: number;
  /** The worker's own run: storage read, decompress, parse and analysis. */
  analysisMs: number;
  /** Carrying the result back from the worker thread. */
  returnMs: number;
  /** The save transaction (result encoding, rows, status). */
  saveMs: number;
}

// The runners of this process. On globalThis, not in this module: the server's runner is loaded
// from the source tree while the routes that queue jobs come from the React Router build, so
// the two sides hold different copies of this module.
const RUNNERS = Symbol.for("twistlog.analysis-runners");
const runners: Set<() => void> = ((globalThis as Record<symbol, unknown>)[RUNNERS] ??= new Set<
  () => void
>()) as Set<() => void>;

/** Starts a claim at once in every runner of this process (after a job was queued and committed). */
export function wakeRunners(): void {
  for (const wake of runners) wake();
}

/** Claims and runs jobs until stopped. Several uploads queue; at most `concurrency` run. */
export function startJobRunner(options: RunnerOptions) {
  const instanceId = `${process.pid}-${randomBytes(4).toString("hex")}`;
  const concurrency = options.concurrency ?? options.pool.options.maxThreads;
  const pollMs = options.pollMs ?? 500;
  const store = options.store ?? { kind: "local", root: options.blobRoot ?? "" };
  let running = 0;
  let claims = 0;
  let stopped = false;
  const active = new Set<Promise<void>>();
  const stopping = new AbortController();
  // A worker that dies before it is ready (e.g. a heap limit too small to load the pipeline)
  // is reported by piscina as a pool 'error', not on the task, which would wait forever: the
  // jobs still waiting for a worker (none has reported progress yet) fail with that error.
  const waiting = new Set<(error: unknown) => void>();
  const onPoolError = (error: unknown) => waiting.forEach((fail) => fail(error));
  options.pool.on?.("error", onPoolError);

  async function tick() {
    while (!stopped && running < concurrency) {
      // The slot is taken before the claim: ticks overlap (poll, wake), and each must see the
      // others' claims in flight, or more jobs than workers are claimed and wait in piscina's
      // own queue, where a worker's death would strand them.
      running++;
      const job = await claimJob(options.db, `${instanceId}#${++claims}`).catch((error) => {
        options.onError?.(error);
        return null;
      });
      if (!job) {
        running--;
        return;
      }
      // A slot is a worker: it is freed as soon as the worker has answered, so the next job
      // starts while this one's result is still being saved (every worker stays busy).
      let freed = false;
      const free = () => {
        if (freed) return;
        freed = true;
        running--;
        if (!stopped) void tick();
      };
      const work = runClaimedJob(options, store, job, stopping.signal, waiting, free)
        .catch((error) => options.onError?.(error))
        .finally(() => {
          free();
          active.delete(work);
        });
      active.add(work);
    }
  }
  const wake = () => void tick();
  runners.add(wake);
  const timer = setInterval(wake, pollMs);
  wake();
  return {
    instanceId,
    /** Wakes this runner at once, instead of at the next poll. */
    poke: wake,
    /** Stops claiming; running jobs are abandoned and handed back to the queue at once. */
    async stop() {
      stopped = true;
      runners.delete(wake);
      clearInterval(timer);
      stopping.abort();
      await Promise.allSettled([...active]);
      options.pool.off?.("error", onPoolError);
    },
  };
}

async function runClaimedJob(
  options: RunnerOptions,
  store: BlobStoreDescription,
  claimed: ClaimedJob,
  signal: AbortSignal,
  waiting: Set<(error: unknown) => void>,
  freeWorker: () => void,
) {
  const { db } = options;
  const claimedAt = Date.now();
  const [log] = await db
    .select({ blobKey: driveLogs.blobKey, sizeBytes: driveLogs.sizeBytes })
    .from(driveLogs)
    .where(eq(driveLogs.id, claimed.driveLogId));
  if (!log) return; // deleted meanwhile; the job row went with it (cascade)

  const blobs = blobStoreFrom(store);
  const applied = await chooseColumns(claimed.settings.ingest, claimed.settings.remembered, () =>
    blobs.read(log.blobKey),
  );
  const job: ClaimedJob = { ...claimed, settings: { ...claimed.settings, applied } };
  await recordSettings(db, job);
  const handedAt = Date.now();

  // Until its worker reports progress the task may still wait for a worker: a pool 'error'
  // (a worker that died before it was ready) then fails it (startJobRunner).
  const poolFailed = new AbortController();
  const fail = (error: unknown) => poolFailed.abort(error);
  waiting.add(fail);
  const channel = new MessageChannel();
  let pending: { stage: string; progress: number } | null = null;
  channel.port2.on("message", (m: { stage: string; progress: number }) => {
    waiting.delete(fail);
    pending = m;
  });
  const takeProgress = () => {
    const taken = pending;
    pending = null;
    return taken;
  };
  const beatNow = () => void beat(db, job, takeProgress).catch(() => {});
  const progressTimer = setInterval(beatNow, 500);
  const heartbeat = setInterval(beatNow, HEARTBEAT_MS);

  let outcome: AnalysisTaskOutcome;
  try {
    const task: AnalysisTask = {
      store,
      blobKey: log.blobKey,
      sizeBytes: log.sizeBytes,
      ingest: ingestOptionsFor(job.settings, applied),
      analysis: job.settings.analysis,
      progress: channel.port1,
    };
    outcome = await options.pool.run(task, {
      transferList: [channel.port1],
      signal: AbortSignal.any([signal, poolFailed.signal]),
    });
  } catch (error) {
    if (signal.aborted) {
      // This instance is stopping: give the job back now rather than after the stale timeout.
      await releaseJob(db, job);
      return;
    }
    const cause = poolFailed.signal.aborted ? poolFailed.signal.reason : error;
    outcome = { ok: false, error: workerFailure(cause, options.pool), warnings: [] };
  } finally {
    waiting.delete(fail);
    clearInterval(progressTimer);
    clearInterval(heartbeat);
    channel.port2.close();
    freeWorker();
  }
  const answeredAt = Date.now();

  if (!outcome.ok) {
    await failJob(db, job, outcome.error);
    return;
  }
  try {
    await saveAnalysis(db, job, outcome.result, options.beforeCommit);
  } catch (error) {
    const reason = error instanceof Error ? error.message.split("\n")[0]! : String(error);
    await retryJob(db, job, reason);
    return;
  }
  const ran = outcome.ran ?? { startedAt: handedAt, endedAt: answeredAt };
  options.onTimings?.({
    jobId: job.id,
    driveLogId: job.driveLogId,
    queuedMs: Math.max(0, claimedAt - claimed.queuedAt.getTime()),
    columnsMs: handedAt - claimedAt,
    workerStartMs: Math.max(0, ran.startedAt - handedAt),
    analysisMs: ran.endedAt - ran.startedAt,
    returnMs: Math.max(0, answeredAt - ran.endedAt),
    saveMs: Date.now() - answeredAt,
  });
}

/**
 * What the drive log says when its worker died or threw instead of answering. Only this job
 * fails: piscina replaces a dead worker and the runner goes on with the next job.
 */
export function workerFailure(error: unknown, pool: Pick<Piscina, "options">): LogError {
  if ((error as NodeJS.ErrnoException | null)?.code === "ERR_WORKER_OUT_OF_MEMORY") {
    const limit = pool.options.resourceLimits?.maxOldGenerationSizeMb;
    return {
      code: "analysis_out_of_memory",
      message: `the analysis ran out of memory${limit ? ` (limit ${limit} MB per analysis)` : ""} and was stopped; split the file into shorter drive logs, or ask an admin to raise ANALYSIS_WORKER_MEMORY_MB`,
    };
  }
  const e = error instanceof Error ? error : new Error(String(error));
  return {
    code: "analysis_crashed",
    message: `the analysis stopped unexpectedly (${e.name}: ${e.message.split("\n")[0]}); please report this drive log`,
  };
}
