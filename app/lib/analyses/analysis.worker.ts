/**
 * A piscina worker: analyses one stored drive log off the request thread. It reads the raw
 * file from storage (the BlobStore the task describes) as a stream and runs the same pipeline as the CLI (app/lib/signal).
 * Progress goes back over the MessagePort in the task; the result is returned whole.
 */
import { analyseSource } from "../signal/index.ts";
import type { LogError } from "../domain/drive-log-terms";
import { blobStoreFrom } from "../infra/storage.server";
import type { AnalysisTask, AnalysisTaskOutcome } from "./tasks";

/** Weights of the stages in the overall progress (parse is the slowest, see npm run bench). */
const STAGES = {
  parse: [0, 0.4],
  track: [0.4, 0.6],
  spectra: [0.6, 0.85],
  results: [0.85, 1],
} as const;

export default async function analyseStoredLog(task: AnalysisTask): Promise<AnalysisTaskOutcome> {
  const startedAt = Date.now();
  const source = blobStoreFrom(task.store).read(task.blobKey);
  let last = -1;
  const outcome = await analyseSource(
    { source, ingest: { sizeHintBytes: task.sizeBytes, ...task.ingest }, analysis: task.analysis },
    (stage, fraction) => {
      const [from, to] = STAGES[stage];
      const overall = from + (to - from) * fraction;
      if (overall - last >= 0.02 || overall === 1) {
        last = overall;
        task.progress?.postMessage({ stage, progress: overall });
      }
    },
  );
  task.progress?.close();
  if (outcome.ok)
    return { ok: true, result: outcome.value.result, ran: { startedAt, endedAt: Date.now() } };
  const e = outcome.error as LogError;
  if (e.code === "read_failed" && e.message.includes("ENOENT")) {
    // Storage lost the file (or this instance looks at another storage): not the file's fault,
    // and the server's paths are nobody's business on the page.
    return {
      ok: false,
      error: {
        code: "raw_file_missing",
        message:
          "the raw file of this drive log is missing from storage; upload it again or ask an admin to check the storage",
        row: null,
        column: null,
      },
      warnings: [],
    };
  }
  return {
    ok: false,
    error: {
      code: e.code,
      message: e.message,
      row: e.row ?? null,
      column: e.column ?? null,
      ...(e.columns ? { columns: e.columns } : {}),
    },
    warnings: outcome.warnings.map(({ code, message }) => ({ code, message })),
  };
}
