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

// ---------------------------------------------------------------------------------------------
// The computation (product rule, docs/trend.md)

/**
 * When a change against the baseline is flagged (Twistlog's own product rule, docs/trend.md):
 * - natural frequency ±10 %: fn ∝ √(k/J), so 10 % is about a fifth of the spring rate, far more
 *   than the two-mass fit's scatter between repeat road tests of one damper (a few %);
 * - damping ratio ±25 %: the fit's damping ratio scatters much more than its frequency;
 * - isolation at the reference speed and start/stop peak amplification ±3 dB: a doubling of
 *   power, a change commonly treated as clearly beyond the repeatability of road-test levels
 *   (common practice, no written source).
 * A change of exactly the threshold is not flagged.
 */
export const DEFAULT_TREND_THRESHOLDS: TrendThresholds = {
  naturalFrequencyPct: 10,
  dampingRatioPct: 25,
  isolationDb: 3,
  amplificationDb: 3,
};

/** One drive log's latest analysis with its four figures, as the loader reads them. */
export interface TrendLogInput extends TrendPoint {
  damperVariant: string;
  /** Signed off by the programme (issue 16); absent: not signed off. */
  signedOff?: boolean;
}

export interface VehicleTrendInput {
  vehicleId: number;
  referenceRpm: number;
  logs: readonly TrendLogInput[];
  thresholds?: TrendThresholds;
}

const QUANTITY: Record<
  TrendQuantity,
  { words: (ref: number) => string; unit: "%" | "dB"; threshold: keyof TrendThresholds }
> = {
  naturalFrequencyHz: {
    words: () => "natural frequency",
    unit: "%",
    threshold: "naturalFrequencyPct",
  },
  dampingRatio: { words: () => "damping ratio", unit: "%", threshold: "dampingRatioPct" },
  isolationAtReferenceDb: {
    words: (rpm) => `isolation at ${Math.round(rpm)} rpm`,
    unit: "dB",
    threshold: "isolationDb",
  },
  startStopPeakAmplificationDb: {
    words: () => "start/stop peak amplification",
    unit: "dB",
    threshold: "amplificationDb",
  },
};

/** The isolation bin nearest `rpm` within one bin width, measured above the noise floor; null if none. */
export function isolationNear(
  points: readonly { rpm: number; dB: number; aboveNoise: boolean }[],
  rpm: number,
  binRpm: number,
): number | null {
  let best: { rpm: number; dB: number } | null = null;
  for (const p of points) {
    if (!p.aboveNoise || Math.abs(p.rpm - rpm) > binRpm + 1e-9) continue;
    const d = Math.abs(p.rpm - rpm);
    // Ties (the reference halfway between two bins) go to the lower bin, so the answer is stable.
    if (!best || d < Math.abs(best.rpm - rpm) - 1e-9) best = p;
  }
  return best ? best.dB : null;
}

const MONTHS = "Jan Feb Mar Apr May Jun Jul Aug Sep Oct Nov Dec".split(" ");

/** "2026-11-04" → "4 Nov 2026". */
export function trendDateText(date: string): string {
  const [y, m, d] = date.split("-").map(Number);
  return `${d} ${MONTHS[(m ?? 1) - 1]} ${y}`;
}

/** "up 12 %", "down 3.4 dB" (whole % and 1-decimal dB, as docs/trend.md says). */
function changeWords(change: number, unit: "%" | "dB"): string {
  const size = unit === "%" ? Math.round(Math.abs(change)) : Math.abs(change).toFixed(1);
  return `${change >= 0 ? "up" : "down"} ${size} ${unit}`;
}

const byDate = (a: TrendPoint, b: TrendPoint) =>
  a.date < b.date ? -1 : a.date > b.date ? 1 : a.logId - b.logId;

/**
 * The trend of each damper variant (sorted by name): its points ascending by date (then log id);
 * its baseline, the first signed-off point, else the first point; and a flag for every later
 * point whose figure differs from the baseline's beyond the threshold. Where the baseline log
 * lacks a figure (an idle log has no model fit), that figure is compared with the first later
 * point that has it, and the flag's baselineDate names that point's date. Drive logs with none
 * of the four figures are left out.
 */
export function vehicleTrend(input: VehicleTrendInput): VehicleTrend {
  const thresholds = input.thresholds ?? DEFAULT_TREND_THRESHOLDS;
  const groups = new Map<string, TrendLogInput[]>();
  for (const log of input.logs) {
    if (TREND_QUANTITIES.every((q) => log[q] === null)) continue;
    groups.set(log.damperVariant, [...(groups.get(log.damperVariant) ?? []), log]);
  }
  const variants = [...groups.keys()].sort((a, b) => a.localeCompare(b));
  return {
    vehicleId: input.vehicleId,
    referenceRpm: input.referenceRpm,
    thresholds,
    variants: variants.map((damperVariant) => {
      const logs = groups.get(damperVariant)!.slice().sort(byDate);
      const signed = logs.findIndex((l) => l.signedOff);
      const start = signed >= 0 ? signed : 0;
      const base = logs[start]!;
      const flags: TrendFlag[] = [];
      for (const quantity of TREND_QUANTITIES) {
        const { words, unit, threshold } = QUANTITY[quantity];
        const refIndex = logs.findIndex((l, i) => i >= start && l[quantity] !== null);
        if (refIndex < 0) continue;
        const ref = logs[refIndex]!;
        const refValue = ref[quantity]!;
        for (const point of logs.slice(refIndex + 1)) {
          const value = point[quantity];
          if (value === null) continue;
          const change =
            unit === "%" ? ((value - refValue) / Math.abs(refValue)) * 100 : value - refValue;
          // 1e-9: a change of exactly the threshold stays unflagged despite binary rounding.
          if (!(Math.abs(change) > thresholds[threshold] + 1e-9)) continue;
          flags.push({
            quantity,
            logId: point.logId,
            change: Math.round(change * 100) / 100,
            unit,
            baselineDate: ref.date,
            message: `${words(input.referenceRpm)} ${changeWords(change, unit)} since ${trendDateText(ref.date)}`,
          });
        }
      }
      flags.sort((a, b) => {
        const ia = logs.findIndex((l) => l.logId === a.logId);
        const ib = logs.findIndex((l) => l.logId === b.logId);
        return (
          ia - ib || TREND_QUANTITIES.indexOf(a.quantity) - TREND_QUANTITIES.indexOf(b.quantity)
        );
      });
      return {
        damperVariant,
        baseline: {
          logId: base.logId,
          date: base.date,
          kind: signed >= 0 ? ("signed-off" as const) : ("first-analysed" as const),
        },
        points: logs.map(({ damperVariant: _v, signedOff: _s, ...point }) => point),
        flags,
      };
    }),
  };
}
