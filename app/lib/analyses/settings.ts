/**
 * The frozen inputs of an analysis job, and how a vehicle's row and any overrides make them.
 * What an analysis ran with is always on record (analysis_jobs.settings).
 */
import type { AnalysisOptions } from "../signal/index.ts";
import type { AppliedMapping, IngestMapping } from "../domain/drive-log-terms";
import type { vehicles } from "../infra/db/schema-drive-logs";
import type { TeamIngestSettings } from "../domain/channel-names";

export interface JobSettings {
  analysis: AnalysisOptions;
  /** Columns chosen by hand for this drive log: always used. */
  ingest: IngestMapping;
  /** The vehicle's remembered choice: used only where it fits the file (column-choice.server.ts). */
  remembered?: IngestMapping | null;
  /** What the run really used, written when it starts (shown on the drive-log page). */
  applied?: AppliedMapping;
  /**
   * The team's channel names and strict flag as they stood when the job was queued: a later
   * change of the team setting does not change what this run read (absent in older jobs).
   */
  team?: TeamIngestSettings;
}

/** Settings a re-analysis may change (issue: order override, block length, bin width). */
export type AnalysisOverrides = Pick<AnalysisOptions, "firingOrder" | "revsPerBlock" | "binRpm">;

/** The vehicle fields a job's settings come from. */
type VehicleSettings = Pick<
  typeof vehicles.$inferSelect,
  "cylinders" | "stroke" | "rattleLimitRadS2" | "firingOrderOverride" | "columnMapping"
>;

/**
 * What a job runs with: the vehicle's engine and limit, any overrides, and the columns — those
 * `chosen` for this drive log, else the vehicle's remembered choice as a suggestion that the job
 * uses only where it fits the file (column-choice.server.ts).
 */
export function jobSettingsFor(
  vehicle: VehicleSettings,
  chosen: IngestMapping | null,
  overrides: AnalysisOverrides = {},
  team?: TeamIngestSettings,
): JobSettings {
  const analysis: AnalysisOptions = {
    cylinders: vehicle.cylinders,
    stroke: vehicle.stroke === 2 ? 2 : 4,
    rattleLimitRadS2: vehicle.rattleLimitRadS2,
    ...(vehicle.firingOrderOverride ? { firingOrder: vehicle.firingOrderOverride } : {}),
    ...Object.fromEntries(Object.entries(overrides).filter(([, v]) => v !== undefined)),
  };
  const frozen = team
    ? { team: { channelNames: team.channelNames.map((c) => ({ ...c })), strict: team.strict } }
    : {};
  return chosen
    ? { analysis, ingest: chosen, remembered: null, ...frozen }
    : { analysis, ingest: {}, remembered: vehicle.columnMapping, ...frozen };
}

/** The ingest options a job's worker gets: the applied columns plus the frozen team settings. */
export function ingestOptionsFor(settings: JobSettings, applied: AppliedMapping) {
  return {
    ...applied.mapping,
    ...(settings.team?.channelNames.length ? { channelNames: settings.team.channelNames } : {}),
    ...(settings.team?.strict ? { strict: true } : {}),
  };
}
