/**
 * Drive log in, checked result out: the path every caller shares (docs/architecture.md §4: the CLI and
 * the server run the same pipeline and produce the same JSON).
 */
import type { Readable } from "node:stream";
import { analyseDriveLog, type AnalysisStage } from "./analyse.ts";
import type { AnalysisOptions } from "./analysis-options.ts";
import { effectiveFiringOrder } from "./firing-order.ts";
import type { IngestOptions } from "./ingest.ts";
import { ingestFile, ingestStream } from "./ingest-stream.ts";
import { analysisResultSchema, type AnalysisResult } from "./result-schema.ts";
import type { DriveLog, Outcome, SignalIssue } from "./types.ts";

export type PipelineStage = "parse" | AnalysisStage;

/** What the pipeline hands back on success: the result and the log it came from. */
export interface FileAnalysis {
  result: AnalysisResult;
  log: DriveLog;
}

export interface PipelineInput {
  /** A file path, or a readable of the raw bytes (the server reads from storage). */
  source: string | Readable | AsyncIterable<string | Uint8Array>;
  ingest: IngestOptions;
  analysis: AnalysisOptions;
}

/**
 * The one pipeline of the CLI, the benchmark and the server's analysis worker: ingest →
 * analyseDriveLog → schema check. Ingest warnings join the result's warnings so the stored
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
  const ingested =
    typeof cmd.source === "string"
      ? await ingestFile(cmd.source, ingestOptions, onBytes)
      : await ingestStream(cmd.source, ingestOptions, onBytes);
  if (!ingested.ok) return ingested;
  onProgress?.("parse", 1);
  const analysed = analyseDriveLog(ingested.value, cmd.analysis, onProgress);
  if (!analysed.ok)
    return {
      ok: false,
      error: analysed.error,
      warnings: [...ingested.warnings, ...analysed.warnings],
    };
  const own = analysed.value.warnings;
  const sameAsAnalysis = (w: SignalIssue) =>
    w.code === "low_sample_rate" && own.some((x) => x.code === "sample_rate_low_for_top_order");
  const merged = [
    ...ingested.warnings
      .filter((w) => !sameAsAnalysis(w))
      .map(({ code, message }) => ({ code, message })),
    ...own,
  ];
  const checked = analysisResultSchema.safeParse({ ...analysed.value, warnings: merged });
  if (!checked.success) {
    const where = checked.error.issues[0]?.path.join(".") ?? "?";
    return {
      ok: false,
      error: {
        code: "result_invalid",
        message: `the result failed its schema at ${where}; please report this log`,
      },
      warnings: merged,
    };
  }
  return { ok: true, value: { result: checked.data, log: ingested.value }, warnings: merged };
}
