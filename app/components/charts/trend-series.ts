/**
 * What one small multiple of the damper-health trend draws (pure): the points of one quantity of
 * one damper variant over test date, its baseline value, the band inside which a change is not
 * flagged, and which points are flagged. Built from the trend JSON (app/lib/domain/trend.ts).
 */
import type {
  TrendQuantity,
  TrendThresholds,
  VariantTrend,
  VehicleTrend,
} from "~/lib/domain/trend";

export interface TrendSeries {
  /** Test dates as seconds since 1970 (UTC midnight), uPlot's time axis. */
  x: number[];
  y: (number | null)[];
  baseline: number | null;
  /** Changes inside [lo, hi] are not flagged; null without a baseline value. */
  band: [number, number] | null;
  flagged: boolean[];
}

/** Whether a quantity's threshold is a relative change (%) or a difference (dB). */
export const RELATIVE: Record<TrendQuantity, boolean> = {
  naturalFrequencyHz: true,
  dampingRatio: true,
  isolationAtReferenceDb: false,
  startStopPeakAmplificationDb: false,
};

export function threshold(q: TrendQuantity, t: TrendThresholds): number {
  return q === "naturalFrequencyHz"
    ? t.naturalFrequencyPct
    : q === "dampingRatio"
      ? t.dampingRatioPct
      : q === "isolationAtReferenceDb"
        ? t.isolationDb
        : t.amplificationDb;
}

/** "2026-11-04" → seconds at UTC midnight of that day. */
export function dateSeconds(date: string): number {
  const [y, m, d] = date.split("-").map(Number);
  return Date.UTC(y!, m! - 1, d!) / 1000;
}

export function trendSeries(
  variant: VariantTrend,
  q: TrendQuantity,
  thresholds: TrendThresholds,
): TrendSeries {
  const base = variant.baseline
    ? (variant.points.find((p) => p.logId === variant.baseline!.logId)?.[q] ?? null)
    : null;
  const t = threshold(q, thresholds);
  const band: [number, number] | null =
    base === null
      ? null
      : RELATIVE[q]
        ? [base * (1 - t / 100), base * (1 + t / 100)]
        : [base - t, base + t];
  const flaggedLogs = new Set(variant.flags.filter((f) => f.quantity === q).map((f) => f.logId));
  return {
    x: variant.points.map((p) => dateSeconds(p.date)),
    y: variant.points.map((p) => p[q]),
    baseline: base,
    band,
    flagged: variant.points.map((p) => flaggedLogs.has(p.logId)),
  };
}

/** Drive logs with at least one figure in the trend, over every variant. */
export function analysedPoints(trend: VehicleTrend | null): number {
  return trend ? trend.variants.reduce((n, v) => n + v.points.length, 0) : 0;
}
