import type { AnalysisResult } from "../signal/result-schema";
import { spreadsheetCsv } from "./export-csv";

/**
 * The result's curves as one CSV table for spreadsheets: one row per engine-speed bin (rpm),
 * isolation at the firing order (dB) and every tracked order's 0-peak amplitude at both sides
 * (rpm), values exactly as in the result JSON. Empty cells where a curve has no bin. Written by
 * the one spreadsheet-safe writer (export-csv.ts).
 */
export function resultCsv(result: AnalysisResult): string {
  const rpms = [
    ...new Set([
      ...result.isolation.map((p) => p.rpm),
      ...result.orderCurves.flatMap((c) => c.points.map((p) => p.rpm)),
    ]),
  ].sort((a, b) => a - b);
  const iso = new Map(result.isolation.map((p) => [p.rpm, p]));
  const fields = [
    "engine_speed_rpm",
    `isolation_order_${result.firingOrder}_dB`,
    "isolation_above_noise",
    ...result.orderCurves.flatMap((c) => [
      `crank_order_${c.order}_amplitude_rpm`,
      `gearbox_order_${c.order}_amplitude_rpm`,
    ]),
  ];
  const curves = result.orderCurves.map((c) => new Map(c.points.map((p) => [p.rpm, p])));
  const data = rpms.map((rpm) => [
    rpm,
    iso.get(rpm)?.dB ?? "",
    iso.has(rpm) ? (iso.get(rpm)!.aboveNoise ? "yes" : "no") : "",
    ...curves.flatMap((m) => [m.get(rpm)?.crankRpm ?? "", m.get(rpm)?.gearboxRpm ?? ""]),
  ]);
  return spreadsheetCsv(fields, data, "\n");
}
