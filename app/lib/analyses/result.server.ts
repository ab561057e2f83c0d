/**
 * The stored result of an analysis: written (encodeResult) and read back (gunzip, JSON, schema
 * check) only here, with the one in-memory cache of what was read. An analysis never changes
 * once saved (a re-analysis is a new row with a new id), so whatever is read of it is kept by
 * its id and shared by every request allowed to see it. Callers check team, drive log and share
 * before they ask; a cached entry answers any id it holds.
 */
import { and, eq, inArray } from "drizzle-orm";
import { gunzipSync, gzipSync } from "node:zlib";
import { analyses } from "~/lib/infra/db/schema-drive-logs";
import { analysisResultSchema, type AnalysisResult } from "~/lib/signal";
import { deepFreeze, Lru } from "../base/lru";
import { db } from "../infra/db.server";

/** One analysis version with its result (checked against the schema). */
export interface StoredAnalysis {
  id: number;
  version: number;
  createdAt: Date;
  result: AnalysisResult;
}

/** The time-domain idle peak (rad/s²) and idle speed (rpm): only in the result JSON, not in columns. */
export interface IdleFigures {
  peakRadS2: number;
  meanRpm: number;
}

/** The two compressed columns a result is kept in (analyses.result_gz, analyses.order_map_gz). */
export interface EncodedResult {
  resultGz: Buffer;
  orderMapGz: Buffer;
}

/** The result as stored: the order map apart, so reading the rest does not unpack it. */
export function encodeResult(result: AnalysisResult): EncodedResult {
  const { orderMap, ...rest } = result;
  return {
    resultGz: gzipSync(JSON.stringify(rest)),
    orderMapGz: gzipSync(JSON.stringify(orderMap)),
  };
}

const unpack = (gz: Buffer): unknown => JSON.parse(gunzipSync(gz).toString("utf8"));

/**
 * The stored result JSON exactly as the signal core produced it (keys in its order, no schema
 * defaults): what the API's result endpoint gives out.
 */
export function decodeStoredJson(stored: EncodedResult): Record<string, unknown> {
  const result = unpack(stored.resultGz) as Record<string, unknown>;
  const orderMap = unpack(stored.orderMapGz);
  // Keys back in the signal core's order (orderMap sits after orderCurves).
  const {
    firingOrder,
    sampleRateHz,
    durationS,
    settings,
    blocks,
    isolation,
    orderCurves,
    ...tail
  } = result;
  return {
    firingOrder,
    sampleRateHz,
    durationS,
    settings,
    blocks,
    isolation,
    orderCurves,
    orderMap,
    ...tail,
  };
}

// ---- The cache ------------------------------------------------------------------------------

/**
 * What has been read of analyses, by analysis id, in three least-recently-used parts with their
 * own bounds, as their sizes differ: a parsed result is up to about 1 MB (the order map has at
 * most 400 rows), a chart body about 200 KB, idle figures a few bytes. Decoding a result (gunzip,
 * JSON, schema check of the order map; 10 ms or more for a demo run-up) with its garbage was
 * about a third of a drive-log page request's CPU under load (bench/load.bench.ts, profiled), and
 * a chart body takes 20–70 ms to build.
 */
const cache = {
  /** Parsed, frozen results. The promise is kept, so requests that arrive together decode once. */
  results: new Lru<number, Promise<AnalysisResult | null>>(16),
  /** Bodies of charts.json (chart-bodies.server.ts). */
  chartBodies: new Lru<number, string>(64),
  idle: new Lru<number, IdleFigures | null>(20_000),
};

/** The parsed result of an analysis (frozen: no request can change what the next one reads). */
export function storedResult(analysisId: number): Promise<AnalysisResult | null> {
  const kept = cache.results.get(analysisId);
  if (kept) return kept;
  const made = (async () => {
    const [row] = await db
      .select({ resultGz: analyses.resultGz, orderMapGz: analyses.orderMapGz })
      .from(analyses)
      .where(eq(analyses.id, analysisId));
    if (!row) return null;
    const parsed = analysisResultSchema.safeParse({
      ...(unpack(row.resultGz) as object),
      orderMap: unpack(row.orderMapGz),
    });
    return parsed.success ? deepFreeze(parsed.data) : null;
  })();
  cache.results.set(analysisId, made);
  // A database error is not kept: the next request tries again.
  made.catch(() => {
    if (cache.results.get(analysisId) === made) cache.results.delete(analysisId);
  });
  return made;
}

/** A chart body built before for this analysis, if still kept. */
export function cachedChartBody(analysisId: number): string | undefined {
  return cache.chartBodies.get(analysisId);
}

export function keepChartBody(analysisId: number, body: string): void {
  cache.chartBodies.set(analysisId, body);
}

const idleSchema = analysisResultSchema.shape.idle.unwrap().pick({
  gearboxAngAccelPeakRadS2: true,
  meanRpm: true,
});

/** The idle figures of these analyses of the team (null: no idle segment). */
export async function idleFiguresOf(
  teamId: number,
  analysisIds: number[],
): Promise<Map<number, IdleFigures | null>> {
  const out = new Map<number, IdleFigures | null>();
  const missing: number[] = [];
  for (const id of new Set(analysisIds)) {
    const known = cache.idle.get(id);
    if (known !== undefined) out.set(id, known);
    else missing.push(id);
  }
  for (let i = 0; i < missing.length; i += 50) {
    // Only the result column: the order map is not needed for these two figures.
    const rows = await db
      .select({ id: analyses.id, resultGz: analyses.resultGz })
      .from(analyses)
      .where(and(inArray(analyses.id, missing.slice(i, i + 50)), eq(analyses.teamId, teamId)));
    for (const row of rows) {
      const idle = idleSchema.safeParse((unpack(row.resultGz) as { idle?: unknown }).idle);
      const figures = idle.success
        ? { peakRadS2: idle.data.gearboxAngAccelPeakRadS2, meanRpm: idle.data.meanRpm }
        : null;
      cache.idle.set(row.id, figures);
      out.set(row.id, figures);
    }
  }
  return out;
}
