import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Piscina } from "piscina";
import { getEnv } from "./env.server";

/** A worker's young generation, MB: V8 makes it three semi-spaces, so 2 MB each. */
const YOUNG_GENERATION_MB = 6;

/**
 * The worker pool for analyses. One core stays free for requests (2-core machines run one
 * analysis at a time; further uploads queue in the database). Workers load TypeScript through
 * tsx, as the server does (docs/decisions/003-custom-server.md). Each worker has a JS heap limit
 * (ANALYSIS_WORKER_MEMORY_MB): a drive log that needs more ends its worker with
 * ERR_WORKER_OUT_OF_MEMORY, the job fails with a message, and piscina starts a fresh worker.
 *
 * `warm` (the server's pool) starts every worker at once and keeps it: a worker's start-up
 * (thread, tsx, loading the pipeline) takes 0.7–0.9 s on a 2-core machine, which a cold pool
 * adds to the first analysis after each idle minute (bench/upload.bench.ts). A worker that
 * fails while starting is not started over and over (piscina stops after the first failure).
 */
export function createAnalysisPool(
  options: { maxThreads?: number; memoryMb?: number; filename?: string; warm?: boolean } = {},
): Piscina {
  const maxThreads = options.maxThreads ?? Math.max(1, availableParallelism() - 1);
  return new Piscina({
    filename: options.filename ?? workerFile(),
    minThreads: options.warm ? maxThreads : 0,
    maxThreads,
    idleTimeout: 60_000,
    execArgv: ["--import", "tsx"],
    resourceLimits: {
      maxOldGenerationSizeMb: options.memoryMb ?? getEnv().ANALYSIS_WORKER_MEMORY_MB,
      // 2 MB semi-spaces, as the command's (bin/twistlog.mjs): the windowed analysis of a large
      // log allocates many short-lived windows, and the default young generation only held
      // more resident memory (docs/performance.md, goal 1).
      maxYoungGenerationSizeMb: YOUNG_GENERATION_MB,
    },
  });
}

/** The worker entry's path; from the source tree, as the Vite build does not bundle it. */
function workerFile(): string {
  const root = process.env.TWISTLOG_APP_ROOT ?? process.cwd();
  return fileURLToPath(
    new URL("app/lib/analyses/analysis.worker.ts", `file://${root.replace(/\/?$/, "/")}`),
  );
}
