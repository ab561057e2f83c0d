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
import { deepFreeze } from "../base/lru";
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
 * What has been read of one analysis. Each part has its own bound, as their sizes differ: a
 * parsed result is up to about 1 MB (the order map has at most 400 rows), a chart body about
 * 200 KB, idle figures a few bytes.
 */
interface Entry {
  /** The parsed, frozen result. The promise is kept, so requests that arrive together decode once. */
  result?: Promise<AnalysisResult | null>;
  /** The body of charts.json (chart-bodies.server.ts). */
  chartBody?: string;
  idle?: IdleFigures | null;
}

/**
 * Decoding a result (gunzip, JSON, schema check of the order map; 10 ms or more for a demo
 * run-up) with its garbage was about a third of a drive-log page request's CPU under load
 * (bench/load.bench.ts, profiled), and a chart body takes 20–70 ms to build.
 */
const LIMITS = { result: 16, chartBody: 64, idle: 20_000 } as const;

/** Least recently used first (a Map keeps insertion order; a read moves its entry to the end). */
const entries = new Map<number, Entry>();

function entry(id: number): Entry {
  const found = entries.get(id) ?? {};
  entries.delete(id);
  entries.set(id, found);
  return found;
}

/** Drops the least recently used parts of `part` beyond its limit (and entries left empty). */
function trim(part: keyof Entry) {
  let held = 0;
  for (const e of entries.values()) if (e[part] !== undefined) held++;
  for (const [id, e] of entries) {
    if (held <= LIMITS[part]) break;
    if (e[part] === undefined) continue;
    delete e[part];
    held--;
    if (Object.keys(e).length === 0) entries.delete(id);
  }
}

/** The parsed result of an analysis (frozen: no request can change what the next one reads). */
export function storedResult(analysisId: number): Promise<AnalysisResult | null> {
  const e = entry(analysisId);
  if (e.result) return e.result;
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
  e.result = made;
  trim("result");
  // A database error is not kept: the next request tries again.
  made.catch(() => {
    if (entries.get(analysisId)?.result === made) delete entries.get(analysisId)!.result;
  });
  return made;
}

/** A chart body built before for this analysis, if still kept. */
export function cachedChartBody(analysisId: number): string | undefined {
  const body = entries.get(analysisId)?.chartBody;
  if (body !== undefined) entry(analysisId);
  return body;
}

export function keepChartBody(analysisId: number, body: string): void {
  entry(analysisId).chartBody = body;
  trim("chartBody");
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
    const known = entries.get(id)?.idle;
    if (known !== undefined) out.set(id, entry(id).idle!);
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
      entry(row.id).idle = figures;
      out.set(row.id, figures);
    }
    trim("idle");
  }
  return out;
}
