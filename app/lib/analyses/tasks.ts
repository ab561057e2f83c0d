/**
 * What the job runner sends a worker thread and what comes back: plain data only, since it is
 * copied between threads. The worker (analysis.worker.ts) and the runner both take these types
 * from here.
 */
import type { MessagePort } from "node:worker_threads";
import type { AnalysisOptions, AnalysisResult, IngestOptions } from "../signal/index.ts";
import type { LogError } from "../domain/drive-log-terms";
import type { BlobStoreDescription } from "../infra/storage.server";

export interface AnalysisTask {
  /** Where the raw file is kept; the worker opens it with blobStoreFrom(). */
  store: BlobStoreDescription;
  blobKey: string;
  sizeBytes: number;
  /** The applied columns plus the team's channel names and strict flag (settings.ts ingestOptionsFor). */
  ingest: IngestOptions;
  analysis: AnalysisOptions;
  /** Receives { stage, progress } (0–1 overall) while the analysis runs. */
  progress?: MessagePort;
}

export type AnalysisTaskOutcome =
  | {
      ok: true;
      result: AnalysisResult;
      /** When the worker began and ended the task (ms since the epoch), for the runner's timings. */
      ran?: { startedAt: number; endedAt: number };
    }
  | { ok: false; error: LogError; warnings: { code: string; message: string }[] };
