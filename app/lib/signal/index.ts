/**
 * The signal core's public face (docs/architecture.md §4): drive log in, analysis result out.
 * Pure TypeScript; only ingest-stream.ts touches Node streams. The server, the CLI and the
 * tests use these exports; the modules behind them are documented in
 * docs/signal-ingest.md and docs/signal-computation.md.
 */
export type { DriveLog, Outcome, SignalIssue, SpeedUnit, TimeUnit } from "./types.ts";

// Ingest: CSV → DriveLog (SI units), errors as values with row and column.
export { createIngester, ingestCsv, type Ingester, type IngestOptions } from "./ingest.ts";
export { ingestFile, ingestStream } from "./ingest-stream.ts";
export {
  fitRemembered,
  recogniseColumn,
  resolveColumns,
  type ColumnGuess,
  type ColumnIssue,
} from "./columns.ts";
export { SPEED_UNITS, TIME_UNITS, fromRadS, toRadS } from "./units.ts";

// The whole pipeline (file or stream → checked result), shared by the CLI and the server.
export {
  analyseSource,
  type FileAnalysis,
  type PipelineInput,
  type PipelineStage,
} from "./pipeline.ts";

// Analysis: DriveLog → AnalysisResult (the JSON the CLI prints and the server stores).
export { analyseDriveLog, type AnalysisStage } from "./analyse.ts";
export { DEFAULTS, type AnalysisOptions } from "./analysis-options.ts";
export {
  analysisResultSchema,
  analysisSettingsSchema,
  type AnalysisResult,
  type AnalysisSettings,
} from "./result-schema.ts";
export {
  firingOrder,
  orderFrequencyHz,
  angularAccelerationRadS2,
  type Stroke,
} from "./firing-order.ts";
export { transmissibility } from "./two-mass-model.ts";
