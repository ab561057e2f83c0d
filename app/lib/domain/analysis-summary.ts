import type { AnalysisResult } from "~/lib/signal";

/** The figures of the drive-log page, taken from the stored result JSON (no re-computation). */
export interface AnalysisSummary {
  firingOrder: number;
  durationS: number;
  sampleRateHz: number;
  /** Engine-speed range of the isolation curve, rpm. */
  rpmRange: [number, number] | null;
  /** Least isolation over the range, dB, and where, rpm. */
  minimum: { rpm: number; dB: number } | null;
  /** Isolation at idle and at fixed speeds, dB; null where the log does not cover the speed. */
  at: { label: string; rpm: number; dB: number | null }[];
  resonance: { rpm: number; dB: number } | null;
  rattle: AnalysisResult["idle"];
  model: { naturalFrequencyHz: number; dampingRatio: number; resonanceRpm: number } | null;
  warnings: { code: string; message: string }[];
  settings: {
    samplesPerRev: number;
    samplesPerRevMin: number;
    revsPerBlock: number;
    overlap: number;
    binRpm: number;
  };
  curve: { rpm: number; dB: number; blocks: number; aboveNoise: boolean }[];
}

/** Speeds shown beside idle, rpm (a common set for passenger-car drivelines; common practice). */
const FIXED_RPM = [1500, 2000, 3000];

/**
 * Reduces a result to the page's figures. A speed counts as covered when an isolation bin lies
 * within half a bin width of it (binRpm, rpm); the least isolation prefers bins above noise.
 */
export function summarise(result: AnalysisResult, idleRpm: number): AnalysisSummary {
  const curve = result.isolation;
  const half = result.settings.binRpm / 2;
  const near = (rpm: number) => {
    let best: (typeof curve)[number] | null = null;
    for (const p of curve)
      if (
        Math.abs(p.rpm - rpm) <= half &&
        (!best || Math.abs(p.rpm - rpm) < Math.abs(best.rpm - rpm))
      )
        best = p;
    return best ? best.dB : null;
  };
  const trusted = curve.some((p) => p.aboveNoise) ? curve.filter((p) => p.aboveNoise) : curve;
  const minimum = trusted.reduce<{ rpm: number; dB: number } | null>(
    (m, p) => (!m || p.dB < m.dB ? { rpm: p.rpm, dB: p.dB } : m),
    null,
  );
  const idle = result.idle?.meanRpm ?? idleRpm;
  return {
    firingOrder: result.firingOrder,
    durationS: result.durationS,
    sampleRateHz: result.sampleRateHz,
    rpmRange: curve.length
      ? [Math.min(...curve.map((p) => p.rpm)), Math.max(...curve.map((p) => p.rpm))]
      : null,
    minimum,
    at: [
      { label: "At idle", rpm: Math.round(idle), dB: near(idle) },
      ...FIXED_RPM.map((rpm) => ({ label: `At ${rpm} rpm`, rpm, dB: near(rpm) })),
    ],
    resonance: result.resonance
      ? { rpm: result.resonance.rpm, dB: result.resonance.isolationDb }
      : null,
    rattle: result.idle,
    model: result.model,
    warnings: result.warnings,
    settings: {
      samplesPerRev: result.settings.samplesPerRev,
      samplesPerRevMin: result.settings.samplesPerRevMin,
      revsPerBlock: result.settings.revsPerBlock,
      overlap: result.settings.overlap,
      binRpm: result.settings.binRpm,
    },
    curve,
  };
}
