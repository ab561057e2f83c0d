import { chartData } from "../domain/chart-data";
import { cachedChartBody, keepChartBody, type StoredAnalysis } from "./result.server";

/**
 * The JSON body of a drive log's charts.json ({ logId, analysis, charts }), built once per
 * analysis and kept in the analyses' cache (result.server.ts): an analysis never changes (a
 * re-analysis is a new row with a new id), so the body can be reused by every later request,
 * whoever is allowed to make it. The callers check team, vehicle and share before they ask, and
 * `read` reads the analysis with those checks (vehicleData's latestAnalysis or analysisOf).
 * Building one takes 20–70 ms for a run-up (gunzip, schema check, re-binning, JSON); a cached
 * one is a string.
 */
export async function chartsBody(
  logId: number,
  // The latest analysis, or an earlier version (?analysis= on the drive-log page) that the
  // caller has checked is this log's.
  analysisId: number | null,
  read: (analysisId: number) => Promise<StoredAnalysis | null>,
): Promise<string | null> {
  if (!analysisId) return null;
  const hit = cachedChartBody(analysisId);
  if (hit !== undefined) return hit;
  const analysis = await read(analysisId);
  if (!analysis) return null;
  const body = JSON.stringify({
    logId,
    analysis: { id: analysis.id, version: analysis.version, createdAt: analysis.createdAt },
    charts: chartData(analysis.result),
  });
  keepChartBody(analysis.id, body);
  return body;
}
