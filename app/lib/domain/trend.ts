/**
 * Damper health over time (issue 15): per damper variant of a vehicle, the trend over test date
 * of the two-mass model's natural frequency and damping ratio, the isolation at the team's
 * reference engine speed and the start/stop peak amplification, each drive log's latest
 * analysis one point; a change beyond a threshold against the variant's baseline (its first
 * signed-off log, or its first analysed one) is flagged. The shape of
 * `GET /api/v1/vehicles/:id/trend` (a public contract: keep the field names).
 * CONTRACT: the types are agreed; `vehicleTrend` computes them (pure).
 */

export const TREND_QUANTITIES = [
  "naturalFrequencyHz",
  "dampingRatio",
  "isolationAtReferenceDb",
  "startStopPeakAmplificationDb",
] as const;
export type TrendQuantity = (typeof TREND_QUANTITIES)[number];

/** One drive log's latest analysis. Null where the analysis has no such figure. */
export interface TrendPoint {
  logId: number;
  analysisId: number;
  analysisVersion: number;
  fileName: string;
  /** The drive log's test date (yyyy-mm-dd), or its upload date when it has none. */
  date: string;
  dateIsUpload: boolean;
  naturalFrequencyHz: number | null;
  dampingRatio: number | null;
  /** Isolation at the firing order in the rpm bin nearest the reference speed, dB; null when no bin lies within one bin width. */
  isolationAtReferenceDb: number | null;
  /** The largest peak amplification over the log's start and stop events, dB. */
  startStopPeakAmplificationDb: number | null;
}

/** A change against the baseline beyond its threshold. */
export interface TrendFlag {
  quantity: TrendQuantity;
  logId: number;
  /** Relative change in % (natural frequency, damping ratio) or difference in dB (isolation, amplification). */
  change: number;
  unit: "%" | "dB";
  baselineDate: string;
  /** One plain sentence, e.g. "natural frequency up 12 % since 4 Nov 2026". */
  message: string;
}

export interface VariantTrend {
  damperVariant: string;
  baseline: { logId: number; date: string; kind: "signed-off" | "first-analysed" } | null;
  /** Ascending by date, then log id. */
  points: TrendPoint[];
  flags: TrendFlag[];
}

export interface TrendThresholds {
  /** |relative change| of the natural frequency that is flagged, %. */
  naturalFrequencyPct: number;
  dampingRatioPct: number;
  /** |change| of the isolation at the reference speed that is flagged, dB. */
  isolationDb: number;
  amplificationDb: number;
}

export interface VehicleTrend {
  vehicleId: number;
  referenceRpm: number;
  thresholds: TrendThresholds;
  variants: VariantTrend[];
}
