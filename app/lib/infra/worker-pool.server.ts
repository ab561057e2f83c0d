import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Piscina } from "piscina";
import { getEnv } from "./env.server";

/**
 * The worker pool for analyses. One core stays free for requests (2-core machines run one
 * analysis at a time; further uploads queue in the database). Workers load TypeScript through
 * tsx, as the server does (docs/decisions/003-custom-server.md). Each worker has a JS heap limit
 * (ANALYSIS_WORKER_MEMORY_MB): a drive log that needs more ends its worker with
 * ERR_WORKER_OUT_OF_MEMORY, the job fails with a message, and piscina starts a fresh worker.
 */
export function createAnalysisPool(
  options: { maxThreads?: number; memoryMb?: number; filename?: string } = {},
): Piscina {
  const maxThreads = options.maxThreads ?? Math.max(1, availableParallelism() - 1);
  return new Piscina({
    filename: options.filename ?? workerFile(),
    minThreads: 0,
    maxThreads,
    idleTimeout: 60_000,
    execArgv: ["--import", "tsx"],
    resourceLimits: {
      maxOldGenerationSizeMb: options.memoryMb ?? getEnv().ANALYSIS_WORKER_MEMORY_MB,
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
