import { packBody, type PackedBody } from "../base/packed-body.server";
import { chartData } from "../domain/chart-data";
import { packedBodyOf, type StoredAnalysis } from "./result.server";

/**
 * The body of a drive log's charts.json ({ logId, analysis, charts }), built and packed (gzip,
 * brotli, strong tag; app/lib/base/packed-body.server.ts) once per analysis and kept in the
 * analyses' cache (result.server.ts): an analysis never changes (a re-analysis is a new row with
 * a new id), so the body is reused by every later request, whoever is allowed to make it. The
 * callers check team, vehicle and share before they ask, and `read` reads the analysis with
 * those checks (vehicleData's latestAnalysis or analysisOf). Building one takes 20–70 ms for a
 * run-up (gunzip, schema check, re-binning, JSON) and packing it about 0.3 s in the thread pool;
 * a kept one is three buffers.
 */
export function chartsBody(
  logId: number,
  // The latest analysis, or an earlier version (?analysis= on the drive-log page) that the
  // caller has checked is this log's.
  analysisId: number | null,
  read: (analysisId: number) => Promise<StoredAnalysis | null>,
): Promise<PackedBody | null> {
  if (!analysisId) return Promise.resolve(null);
  return packedBodyOf("charts", analysisId, async () => {
    const analysis = await read(analysisId);
    if (!analysis) return null;
    return packBody(
      JSON.stringify({
        logId,
        analysis: { id: analysis.id, version: analysis.version, createdAt: analysis.createdAt },
        charts: chartData(analysis.result),
      }),
    );
  });
}
