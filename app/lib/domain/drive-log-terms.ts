/**
 * The product's words for vehicles and drive logs (docs/architecture.md §3), shared by the schema, the
 * forms, the API and the pages. The API values are a public contract: keep them stable.
 */

export const LOG_CONDITIONS = [
  "idle-neutral",
  "idle-in-gear",
  "drive-away",
  "run-up",
  "coast-down",
  "start-stop",
  "steady",
  "other",
] as const;
export type LogCondition = (typeof LOG_CONDITIONS)[number];

export const conditionLabels: Record<LogCondition, string> = {
  "idle-neutral": "Idle, neutral",
  "idle-in-gear": "Idle in gear",
  "drive-away": "Drive-away",
  "run-up": "Run-up",
  "coast-down": "Coast-down",
  "start-stop": "Engine start / stop",
  steady: "Steady speed",
  other: "Other",
};

/** A drive log's gear as pages show it: "—" when not given, neutral (0), reverse (−1) or its number. */
export function gearLabel(g: number | null): string {
  return g === null ? "—" : g === 0 ? "neutral" : g === -1 ? "reverse" : String(g);
}

/** A drive log's state as the API reports it. */
export const LOG_STATES = ["queued", "analysing", "done", "failed"] as const;
export type LogState = (typeof LOG_STATES)[number];

export const JOB_STATES = ["queued", "running", "done", "failed"] as const;
export type JobState = (typeof JOB_STATES)[number];

export const FUELS = ["diesel", "petrol", "hybrid", "other"] as const;
export type Fuel = (typeof FUELS)[number];

export const TRANSMISSION_TYPES = [
  "manual",
  "dual-clutch",
  "automatic",
  "automated-manual",
  "other",
] as const;
export type TransmissionType = (typeof TRANSMISSION_TYPES)[number];

export const transmissionLabels: Record<TransmissionType, string> = {
  manual: "Manual",
  "dual-clutch": "Dual-clutch",
  automatic: "Automatic (torque converter)",
  "automated-manual": "Automated manual",
  other: "Other",
};

export const DAMPER_TYPES = [
  "dual-mass-flywheel",
  "dual-mass-flywheel-pendulum",
  "clutch-disc-damper",
  "clutch-disc-damper-pendulum",
] as const;
export type DamperType = (typeof DAMPER_TYPES)[number];

export const damperLabels: Record<DamperType, string> = {
  "dual-mass-flywheel": "Dual-mass flywheel",
  "dual-mass-flywheel-pendulum": "Dual-mass flywheel with pendulum absorber",
  "clutch-disc-damper": "Clutch-disc damper",
  "clutch-disc-damper-pendulum": "Clutch-disc damper with pendulum absorber",
};

/** Default rattle limit and where it comes from (docs/references.md). */
export const DEFAULT_RATTLE_LIMIT_RAD_S2 = 500;
export const RATTLE_LIMIT_SOURCE =
  "Design limit on input-shaft angular acceleration reported in Shock and Vibration 2022, art. 2954825.";

/** Column choices for a vehicle's logs (the ingest's overrides). */
export interface IngestMapping {
  timeColumn?: string;
  crankColumn?: string;
  gearboxColumn?: string;
  timeUnit?: "s" | "ms";
  crankUnit?: "rpm" | "rad/s" | "deg/s" | "rev/s";
  gearboxUnit?: "rpm" | "rad/s" | "deg/s" | "rev/s";
}

/**
 * The columns an analysis really read a drive log with, and where they came from: chosen for
 * this drive log by hand, the vehicle's remembered choice (it fitted this file's header), or
 * recognised from the header alone. Stored with the job and the analysis settings.
 */
export interface AppliedMapping {
  source: "chosen" | "remembered" | "header";
  mapping: IngestMapping;
  /** The vehicle's remembered choice when it did not fit this file and was left out. */
  skipped?: IngestMapping;
}

/** Why a drive log failed, as the page and the API show it. */
export interface LogError {
  code: string;
  message: string;
  row?: number | null;
  column?: string | null;
  /** For a column problem: the header, so the page can offer a mapping. */
  columns?: string[];
}
