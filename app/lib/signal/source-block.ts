/**
 * The result's `source` block (result-schema.ts): what a DriveLog says about the file it came
 * from, in the JSON every figure can be traced back to. Times in s.
 */
import { round } from "./order-curves.ts";
import type { AnalysisResult } from "./result-schema.ts";
import type { DriveLog } from "./types.ts";

export function sourceBlock(log: DriveLog): NonNullable<AnalysisResult["source"]> {
  const { source: s, timeS } = log;
  const n = timeS.length;
  const sections = log.sections ?? [
    { startIndex: 0, endIndex: n, startS: timeS[0] ?? 0, endS: timeS[n - 1] ?? 0 },
  ];
  return {
    format: s.format ?? "csv",
    channels: { time: s.timeColumn, crank: s.crankColumn, gearbox: s.gearboxColumn },
    units: { time: s.timeUnit, crank: s.crankUnit, gearbox: s.gearboxUnit },
    metadata: (s.metadata ?? []).map(({ key, value }) => ({ key, value })),
    repairs: (s.repairs ?? []).map((r) => ({
      ...r,
      rows: r.rows.slice(0, 50),
      fromS: round(r.fromS, 6),
      toS: round(r.toS, 6),
    })),
    sections: sections
      .filter((x) => x.endIndex > x.startIndex)
      .map((x) => ({
        startS: round(x.startS, 6),
        endS: round(x.endS, 6),
        samples: x.endIndex - x.startIndex,
      })),
  };
}
