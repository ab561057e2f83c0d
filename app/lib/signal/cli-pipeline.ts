/**
 * The CLI's pipeline: pipeline.ts analyseSource with the two-thread CSV ingest
 * (ingest-parallel.ts) in place of the one-thread one. The steps after the ingest are
 * analyseSource's own, repeated here because analyseSource reads its source itself; they must
 * stay the same (cli-bin.test.ts compares the two outputs on a bench log).
 */
import { analyseDriveLog } from "./analyse.ts";
import { effectiveFiringOrder } from "./firing-order.ts";
import { ingestFileParallel } from "./ingest-parallel.ts";
import type { FileAnalysis, PipelineInput, PipelineStage } from "./pipeline.ts";
import { analysisResultSchema } from "./result-schema.ts";
import type { Outcome, SignalIssue } from "./types.ts";

/** analyseSource for a file path, the CSV ingest on two threads. */
export async function analyseFile(
  cmd: PipelineInput & { source: string },
  onProgress?: (stage: PipelineStage, fraction: number) => void,
): Promise<Outcome<FileAnalysis>> {
  const q =
    effectiveFiringOrder(
      cmd.analysis.cylinders ?? 4,
      cmd.analysis.stroke ?? 4,
      cmd.analysis.firingOrder,
    ) ?? 2;
  onProgress?.("parse", 0);
  // 2 × firing order is the highest order the summary relies on (as analyseSource).
  const ingestOptions = { topOrder: 2 * q, ...cmd.ingest };
  const ingested = await ingestFileParallel(cmd.source, ingestOptions, (f) =>
    onProgress?.("parse", f),
  );
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
