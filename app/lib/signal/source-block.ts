/**
 * The result's `source` block (result-schema.ts): what a DriveLog says about the file it came
 * from (its `source` and its sections, sectionsOf: one covering the log when it has none), in
 * the JSON every figure can be traced back to. Times in s.
 */
import { round } from "./order-curves.ts";
import type { AnalysisResult } from "./result-schema.ts";
import type { DriveLog, LogSection } from "./types.ts";

export function sourceBlock(
  s: DriveLog["source"],
  sections: readonly LogSection[],
): NonNullable<AnalysisResult["source"]> {
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
