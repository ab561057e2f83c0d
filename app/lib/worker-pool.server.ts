import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { Piscina } from "piscina";

/**
 * The worker pool for analyses. One core stays free for requests (2-core machines run one
 * analysis at a time; further uploads queue in the database). Workers load TypeScript through
 * tsx, as the server does (docs/decisions/003-custom-server.md).
 */
export function createAnalysisPool(options: { maxThreads?: number } = {}): Piscina {
  const maxThreads = options.maxThreads ?? Math.max(1, availableParallelism() - 1);
  return new Piscina({
    filename: workerFile(),
    minThreads: 0,
    maxThreads,
    idleTimeout: 60_000,
    execArgv: ["--import", "tsx"],
  });
}

/** The worker entry's path; from the source tree, as the Vite build does not bundle it. */
function workerFile(): string {
  const root = process.env.TWISTLOG_APP_ROOT ?? process.cwd();
  return fileURLToPath(
    new URL("app/workers/analysis.worker.ts", `file://${root.replace(/\/?$/, "/")}`),
  );
}
