/**
 * The stored result of an analysis: written (encodeResult) and read back (gunzip, JSON, schema
 * check) only here, with the one in-memory cache of what was read. An analysis never changes
 * once saved (a re-analysis is a new row with a new id), so whatever is read of it is kept by
 * its id and shared by every request allowed to see it. Callers check team, drive log and share
 * before they ask; a cached entry answers any id it holds.
 */
import { and, eq, inArray } from "drizzle-orm";
import { gunzipSync, gzipSync } from "node:zlib";
import { z } from "zod";
import { analyses } from "~/lib/infra/db/schema-drive-logs";
import { analysisResultSchema, type AnalysisResult } from "~/lib/signal";
import { deepFreeze, Lru } from "../base/lru";
import { packBody, type PackedBody } from "../base/packed-body.server";
import { db } from "../infra/db.server";
import type { EventFigure } from "../domain/event-figures";

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

/** What the targets and the trend read of a result's start/stop events and model fit. */
export interface TransientFigures {
  /** The events; null when the result was stored before events were detected (re-analyse). */
  events: EventFigure[] | null;
  model: { naturalFrequencyHz: number; dampingRatio: number } | null;
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

/**
 * The stored result JSON of one analysis of the team as the API serves it (decodeStoredJson),
 * packed once and kept; null when there is no such analysis in the team. The caller checks that
 * the analysis belongs to the drive log it was asked for.
 */
export function packedStoredJson(teamId: number, analysisId: number): Promise<PackedBody | null> {
  return packedBodyOf("result", analysisId, async () => {
    const [stored] = await db
      .select({ resultGz: analyses.resultGz, orderMapGz: analyses.orderMapGz })
      .from(analyses)
      .where(and(eq(analyses.id, analysisId), eq(analyses.teamId, teamId)));
    return stored ? packBody(JSON.stringify(decodeStoredJson(stored))) : null;
  });
}

// ---- The cache ------------------------------------------------------------------------------

/**
 * What has been read of analyses, by analysis id, in four least-recently-used parts with their
 * own bounds, as their sizes differ: a parsed result is up to about 1 MB (the order map has at
 * most 400 rows), a packed body a few hundred KB, idle and transient figures a few bytes to a few
 * hundred. Decoding a result (gunzip, JSON, schema check of the order map; 10 ms or more for a
 * demo run-up) with its garbage was about a third of a drive-log page request's CPU under load
 * (bench/load.bench.ts, profiled); a chart body takes 20–70 ms to build and 0.3 s to pack.
 */
const cache = {
  /** Parsed, frozen results. The promise is kept, so requests that arrive together decode once. */
  results: new Lru<number, Promise<AnalysisResult | null>>(16),
  /**
   * Packed bodies (identity, gzip, brotli; about 300 KB for a run-up's chart body) by kind and
   * analysis id: charts.json (chart-bodies.server.ts) and the API's result JSON. The promise is
   * kept, so requests that arrive together pack once.
   */
  bodies: new Lru<string, Promise<PackedBody | null>>(64),
  idle: new Lru<number, IdleFigures | null>(20_000),
  transient: new Lru<number, TransientFigures>(20_000),
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

/**
 * The packed body of kind `kind` for an analysis, made by `make` on the first request and kept
 * (an analysis never changes). Callers check who may see it before they ask; a failure or a null
 * (nothing to show) is not kept, so the next request tries again.
 */
export function packedBodyOf(
  kind: "charts" | "result",
  analysisId: number,
  make: () => Promise<PackedBody | null>,
): Promise<PackedBody | null> {
  const key = `${kind}:${analysisId}`;
  const kept = cache.bodies.get(key);
  if (kept) return kept;
  const made = make();
  cache.bodies.set(key, made);
  const forget = () => {
    if (cache.bodies.get(key) === made) cache.bodies.delete(key);
  };
  made.then((body) => body ?? forget(), forget);
  return made;
}

/**
 * Figures read from the result JSON (not the order map) of these analyses of the team, kept by
 * analysis id in `kept`. `read` gives undefined for a result it cannot read: left out, not kept.
 */
async function figuresOf<T>(
  teamId: number,
  analysisIds: readonly number[],
  kept: Lru<number, T>,
  read: (result: Record<string, unknown>) => T | undefined,
): Promise<Map<number, T>> {
  const out = new Map<number, T>();
  const missing: number[] = [];
  for (const id of new Set(analysisIds)) {
    const known = kept.get(id);
    if (known !== undefined) out.set(id, known);
    else missing.push(id);
  }
  for (let i = 0; i < missing.length; i += 50) {
    const rows = await db
      .select({ id: analyses.id, resultGz: analyses.resultGz })
      .from(analyses)
      .where(and(inArray(analyses.id, missing.slice(i, i + 50)), eq(analyses.teamId, teamId)));
    for (const row of rows) {
      const figures = read(unpack(row.resultGz) as Record<string, unknown>);
      if (figures === undefined) continue;
      kept.set(row.id, figures);
      out.set(row.id, figures);
    }
  }
  return out;
}

const idleSchema = analysisResultSchema.shape.idle.unwrap().pick({
  gearboxAngAccelPeakRadS2: true,
  meanRpm: true,
});

/** The idle figures of these analyses of the team (null: no idle segment). */
export function idleFiguresOf(
  teamId: number,
  analysisIds: number[],
): Promise<Map<number, IdleFigures | null>> {
  return figuresOf(teamId, analysisIds, cache.idle, (result) => {
    const idle = idleSchema.safeParse(result.idle);
    return idle.success
      ? { peakRadS2: idle.data.gearboxAngAccelPeakRadS2, meanRpm: idle.data.meanRpm }
      : null;
  });
}

const transientSchema = z.object({
  events: analysisResultSchema.shape.events,
  model: analysisResultSchema.shape.model.optional(),
});

/**
 * The start/stop events and the two-mass model fit of these analyses of the team: the targets
 * need each event (the analyses row keeps only the largest figures), and analyses saved before
 * issue 15 have no model columns. An unreadable result is left out.
 */
export function transientFiguresOf(
  teamId: number,
  analysisIds: readonly number[],
): Promise<Map<number, TransientFigures>> {
  return figuresOf(teamId, analysisIds, cache.transient, (result) => {
    const parsed = transientSchema.safeParse(result);
    if (!parsed.success) return undefined;
    const { events, model } = parsed.data;
    return {
      events:
        events?.map((e) => ({
          kind: e.kind,
          startS: e.startS,
          peakAmplificationDb: e.peakAmplificationDb,
          twistPeakToPeakDeg: e.twistPeakToPeakDeg,
          resonanceRpm: e.resonanceRpm,
        })) ?? null,
      model: model
        ? { naturalFrequencyHz: model.naturalFrequencyHz, dampingRatio: model.dampingRatio }
        : null,
    };
  });
}
