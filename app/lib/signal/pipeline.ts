/**
 * Drive log in, checked result out: the path every caller shares (docs/architecture.md §4: the CLI and
 * the server run the same pipeline and produce the same JSON).
 *
 * Two ways through, with the same result (within 0.01 dB, analyse-samples.test.ts): a log up to
 * `inMemoryLimitBytes` is read into three arrays and analysed whole (analyse.ts, the faster
 * way); a larger one, or one of unknown size, is spooled to temporary files as it is read
 * (ingest-samples.ts) and analysed in windows (analyse-samples.ts), in memory that does not grow
 * with the log. docs/performance.md has the figures behind the limit.
 */
import { stat } from "node:fs/promises";
import type { Readable } from "node:stream";
import { analyseDriveLog, type AnalysisStage } from "./analyse.ts";
import { analyseSamples } from "./analyse-samples.ts";
import type { AnalysisOptions } from "./analysis-options.ts";
import { effectiveFiringOrder } from "./firing-order.ts";
import type { IngestOptions } from "./ingest.ts";
import { ingestSamples } from "./ingest-samples.ts";
import { ingestFile, ingestStream } from "./ingest-stream.ts";
import { analysisResultSchema, type AnalysisResult } from "./result-schema.ts";
import type { SampleSource } from "./sample-source.ts";
import type { DriveLog, Outcome, SignalIssue } from "./types.ts";

export type PipelineStage = "parse" | AnalysisStage;

/** What the pipeline tells of the log besides the result: everything but its samples. */
export type LogInfo = Omit<SampleSource, "read" | "close" | "length">;

/** What the pipeline hands back on success: the result and the log it came from. */
export interface FileAnalysis {
  result: AnalysisResult;
  log: LogInfo;
  /** Which way the samples went: three arrays in memory, or temporary files read in windows. */
  way: "memory" | "windows";
}

/**
 * Logs up to this size (bytes of the raw file) are analysed in memory: a 128 MiB CSV of
 * 4.2 M rows peaks near 400 MB that way, and takes about 1.5 × as long in windows
 * (docs/performance.md). Larger logs go through windows.
 */
export const IN_MEMORY_LIMIT_BYTES = 128 * 1024 * 1024;

/** A file-path ingest of the whole log into memory (ingest-stream.ts ingestFile, or the CLI's two-thread one). */
export type WholeFileIngest = typeof ingestFile;

export interface PipelineInput {
  /** A file path, or a readable of the raw bytes (the server reads from storage). */
  source: string | Readable | AsyncIterable<string | Uint8Array>;
  ingest: IngestOptions;
  analysis: AnalysisOptions;
  /** See IN_MEMORY_LIMIT_BYTES (0: always in windows). A stream's size is ingest.sizeHintBytes. */
  inMemoryLimitBytes?: number;
  /** The in-memory ingest of a file path (default ingestFile). */
  ingestWholeFile?: WholeFileIngest;
}

/** Size of the raw log in bytes, when known. */
async function sizeOf(cmd: PipelineInput): Promise<number | undefined> {
  if (typeof cmd.source !== "string") return cmd.ingest.sizeHintBytes;
  // An unreadable path goes on to the ingest, which says what is wrong with it.
  return stat(cmd.source).then(
    (s) => (s.isFile() ? s.size : 0),
    () => 0,
  );
}

/**
 * The one pipeline of the CLI, the benchmark and the server's analysis worker: ingest →
 * analysis → schema check. Ingest warnings join the result's warnings so the stored
 * document carries them.
 */
export async function analyseSource(
  cmd: PipelineInput,
  onProgress?: (stage: PipelineStage, fraction: number) => void,
): Promise<Outcome<FileAnalysis>> {
  const q =
    effectiveFiringOrder(
      cmd.analysis.cylinders ?? 4,
      cmd.analysis.stroke ?? 4,
      cmd.analysis.firingOrder,
    ) ?? 2;
  onProgress?.("parse", 0);
  // 2 × firing order is the highest order the summary relies on (issue 4: 0.5, 1, q, 2q).
  const ingestOptions = { topOrder: 2 * q, ...cmd.ingest };
  const onBytes = (f: number) => onProgress?.("parse", f);
  const size = await sizeOf(cmd);
  const inMemory = size !== undefined && size <= (cmd.inMemoryLimitBytes ?? IN_MEMORY_LIMIT_BYTES);

  let log: LogInfo;
  let ingestWarnings: SignalIssue[];
  let analysed: Outcome<AnalysisResult>;
  if (inMemory) {
    const ingested =
      typeof cmd.source === "string"
        ? await (cmd.ingestWholeFile ?? ingestFile)(cmd.source, ingestOptions, onBytes)
        : await ingestStream(cmd.source, ingestOptions, onBytes);
    if (!ingested.ok) return ingested;
    onProgress?.("parse", 1);
    log = infoOf(ingested.value);
    ingestWarnings = ingested.warnings;
    analysed = analyseDriveLog(ingested.value, cmd.analysis, onProgress);
  } else {
    const ingested = await ingestSamples(cmd.source, ingestOptions, onBytes);
    if (!ingested.ok) return ingested;
    onProgress?.("parse", 1);
    const source = ingested.value;
    const { read: _r, close: _c, length: _l, ...info } = source;
    log = info;
    ingestWarnings = ingested.warnings;
    try {
      analysed = analyseSamples(source, cmd.analysis, onProgress);
    } finally {
      source.close();
    }
  }
  if (!analysed.ok)
    return {
      ok: false,
      error: analysed.error,
      warnings: [...ingestWarnings, ...analysed.warnings],
    };
  const own = analysed.value.warnings;
  const sameAsAnalysis = (w: SignalIssue) =>
    w.code === "low_sample_rate" && own.some((x) => x.code === "sample_rate_low_for_top_order");
  const merged = [
    ...ingestWarnings
      .filter((w) => !sameAsAnalysis(w))
      .map(({ code, message }) => ({ code, message })),
    ...own,
  ];
  // The analysis checked its document against the schema; only the warnings are new here.
  const checked = analysisResultSchema.shape.warnings.safeParse(merged);
  if (!checked.success) {
    const where = ["warnings", ...(checked.error.issues[0]?.path ?? [])].join(".");
    return {
      ok: false,
      error: {
        code: "result_invalid",
        message: `the result failed its schema at ${where}; please report this log`,
      },
      warnings: merged,
    };
  }
  return {
    ok: true,
    value: {
      result: { ...analysed.value, warnings: checked.data },
      log,
      way: inMemory ? "memory" : "windows",
    },
    warnings: merged,
  };
}

function infoOf(log: DriveLog): LogInfo {
  const { timeS: _t, crankRadS: _c, gearboxRadS: _g, extra: _e, ...info } = log;
  return info;
}
