import { chartData } from "../domain/chart-data";
import type { DriveLogRow, vehicleData } from "../data/vehicles.server";

/**
 * The JSON body of a drive log's charts.json ({ logId, analysis, charts }), built once per
 * analysis and kept in memory: an analysis never changes (a re-analysis is a new row with a new
 * id), so the body can be reused by every later request, whoever is allowed to make it. The
 * callers check team, vehicle and share before they ask. Building one takes 20–70 ms for a
 * run-up (gunzip, schema check, re-binning, JSON); a cached one is a string.
 */
const cache = new Map<number, string>();
/** About 200 KB each: 64 bodies stay near 12 MB. */
const MAX_ENTRIES = 64;

export async function chartsBody(
  data: ReturnType<typeof vehicleData>,
  log: DriveLogRow,
  // An earlier version (?analysis= on the drive-log page); the caller has checked it is this log's.
  analysisId: number | null = log.latestAnalysisId,
): Promise<string | null> {
  if (!analysisId) return null;
  const hit = cache.get(analysisId);
  if (hit !== undefined) {
    // Least recently used goes first: move this one to the end.
    cache.delete(analysisId);
    cache.set(analysisId, hit);
    return hit;
  }
  const analysis =
    analysisId === log.latestAnalysisId
      ? await data.latestAnalysis(log.id)
      : await data.analysisOf(log.id, analysisId);
  if (!analysis) return null;
  const body = JSON.stringify({
    logId: log.id,
    analysis: { id: analysis.id, version: analysis.version, createdAt: analysis.createdAt },
    charts: chartData(analysis.result),
  });
  cache.set(analysis.id, body);
  if (cache.size > MAX_ENTRIES) cache.delete(cache.keys().next().value!);
  return body;
}
