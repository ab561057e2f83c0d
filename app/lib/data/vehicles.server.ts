import { and, asc, desc, eq, inArray, isNull, ne } from "drizzle-orm";
import { gunzipSync } from "node:zlib";
import { z } from "zod";
import { analyses, analysisJobs, driveLogs, vehicles } from "~/lib/infra/db/schema-drive-logs";
import { analysisResultSchema, type AnalysisOptions, type AnalysisResult } from "~/lib/signal";
import { enqueueAnalysis, type JobSettings } from "../analyses/analysis-jobs.server";
import { db } from "../infra/db.server";
import type { AppliedMapping, IngestMapping } from "../domain/drive-log-terms";
import { deepFreeze, Lru } from "../base/lru";
import { NotFound } from "../domain/errors";
import type { StoredBlob } from "../infra/storage.server";
import type { LogMetadata, VehicleInput } from "../domain/vehicle-schema";

export type Vehicle = typeof vehicles.$inferSelect;
export type DriveLogRow = typeof driveLogs.$inferSelect;

/** One analysis version with its result (checked against the schema). */
export interface StoredAnalysis {
  id: number;
  version: number;
  createdAt: Date;
  result: AnalysisResult;
}

/**
 * Parsed analysis results by analysis id. Decoding one (gunzip, JSON, schema check of the
 * order map; 10 ms or more for a demo run-up) with its garbage was about a third of a drive-log
 * page request's CPU under load (bench/load.bench.ts, profiled); an analysis never changes, so
 * the parsed result is kept, frozen so no request can change what the next one reads. The
 * promise is kept, so requests that arrive together decode once. At most about 1 MB each (the
 * order map has at most 400 rows).
 */
const decoded = new Lru<number, Promise<AnalysisResult | null>>(16);

function decodedResult(analysisId: number): Promise<AnalysisResult | null> {
  const hit = decoded.get(analysisId);
  if (hit) return hit;
  const made = (async () => {
    const [row] = await db
      .select({ resultGz: analyses.resultGz, orderMapGz: analyses.orderMapGz })
      .from(analyses)
      .where(eq(analyses.id, analysisId));
    if (!row) return null;
    const parsed = analysisResultSchema.safeParse({
      ...(JSON.parse(gunzipSync(row.resultGz).toString("utf8")) as object),
      orderMap: JSON.parse(gunzipSync(row.orderMapGz).toString("utf8")) as unknown,
    });
    return parsed.success ? deepFreeze(parsed.data) : null;
  })();
  decoded.set(analysisId, made);
  // A database error is not kept: the next request tries again.
  made.catch(() => decoded.delete(analysisId));
  return made;
}

/** The two settings of analyses.settings the version list names (besides the firing order). */
const versionSettings = z.looseObject({
  revsPerBlock: z.number().optional(),
  binRpm: z.number().optional(),
});

/** Settings a re-analysis may change (issue: order override, block length, bin width). */
export type AnalysisOverrides = Pick<AnalysisOptions, "firingOrder" | "revsPerBlock" | "binRpm">;

/**
 * What a job runs with: the vehicle's engine and limit, any overrides, and the columns — those
 * `chosen` for this drive log, else the vehicle's remembered choice as a suggestion that the job
 * uses only where it fits the file (column-choice.server.ts).
 */
export function jobSettingsFor(
  vehicle: Vehicle,
  chosen: IngestMapping | null,
  overrides: AnalysisOverrides = {},
): JobSettings {
  const analysis: AnalysisOptions = {
    cylinders: vehicle.cylinders,
    stroke: vehicle.stroke === 2 ? 2 : 4,
    rattleLimitRadS2: vehicle.rattleLimitRadS2,
    ...(vehicle.firingOrderOverride ? { firingOrder: vehicle.firingOrderOverride } : {}),
    ...Object.fromEntries(Object.entries(overrides).filter(([, v]) => v !== undefined)),
  };
  return chosen
    ? { analysis, ingest: chosen, remembered: null }
    : { analysis, ingest: {}, remembered: vehicle.columnMapping };
}

/**
 * Every read and write of vehicles and drive logs goes through here with the team in each
 * query (docs/architecture.md §2): another team's vehicle or log is a 404, like one that does not exist.
 */
export function vehicleData(teamId: number) {
  const inTeam = eq(vehicles.teamId, teamId);

  async function vehicle(id: number): Promise<Vehicle> {
    const [row] = await db
      .select()
      .from(vehicles)
      .where(and(eq(vehicles.id, id), inTeam));
    if (!row) throw new NotFound("No such vehicle in this team.");
    return row;
  }

  async function log(id: number): Promise<DriveLogRow> {
    const [row] = await db
      .select()
      .from(driveLogs)
      .where(and(eq(driveLogs.id, id), eq(driveLogs.teamId, teamId)));
    if (!row) throw new NotFound("No such drive log in this team.");
    return row;
  }

  /** A drive log in its vehicle, as a URL names them: 404 unless the log is that vehicle's. */
  async function vehicleLog(vehicleId: number, logId: number) {
    const [v, l] = await Promise.all([vehicle(vehicleId), log(logId)]);
    if (l.vehicleId !== v.id) throw new NotFound("No such drive log for this vehicle.");
    return { vehicle: v, log: l };
  }

  /** The columns the drive log's last finished run read (and where they came from), or null. */
  async function appliedColumns(logId: number): Promise<AppliedMapping | null> {
    const [job] = await db
      .select({ settings: analysisJobs.settings })
      .from(analysisJobs)
      .where(
        and(
          eq(analysisJobs.driveLogId, logId),
          eq(analysisJobs.teamId, teamId),
          inArray(analysisJobs.status, ["done", "failed"]),
        ),
      )
      .orderBy(desc(analysisJobs.id))
      .limit(1);
    if (!job) return null;
    const settings = job.settings as unknown as JobSettings;
    if (settings.applied) return settings.applied;
    // Jobs queued before the choice was recorded ran with `ingest` as it stood.
    const mapping = settings.ingest ?? {};
    return { source: Object.keys(mapping).length ? "chosen" : "header", mapping };
  }

  /** An analysis row of this team and drive log with its result parsed; null if none or unreadable. */
  async function readAnalysis(logId: number, analysisId: number): Promise<StoredAnalysis | null> {
    // The team and drive-log check stays a query of its own on every call; only the result,
    // the same for everyone allowed to see it, comes from the cache.
    const [stored] = await db
      .select({ id: analyses.id, version: analyses.version, createdAt: analyses.createdAt })
      .from(analyses)
      .where(
        and(
          eq(analyses.id, analysisId),
          eq(analyses.driveLogId, logId),
          eq(analyses.teamId, teamId),
        ),
      );
    if (!stored) return null;
    const result = await decodedResult(stored.id);
    return result ? { ...stored, result } : null;
  }

  /**
   * addLog for several files with the same test details, all in one transaction: a failure
   * (the database went away) records none of them, so the upload can simply be sent again.
   */
  async function addLogs(args: {
    vehicle: Vehicle;
    files: { fileName: string; stored: StoredBlob }[];
    metadata: LogMetadata;
    uploadedBy: number | null;
  }): Promise<{ id: number; duplicateOf: number | null }[]> {
    const { vehicle: v, metadata } = args;
    return db.transaction(async (tx) => {
      const added = [];
      for (const { fileName, stored } of args.files) {
        const [earlier] = await tx
          .select({ id: driveLogs.id })
          .from(driveLogs)
          .where(
            and(
              eq(driveLogs.vehicleId, v.id),
              eq(driveLogs.teamId, teamId),
              eq(driveLogs.blobKey, stored.key),
            ),
          )
          .orderBy(asc(driveLogs.id))
          .limit(1);
        const [row] = await tx
          .insert(driveLogs)
          .values({
            teamId,
            vehicleId: v.id,
            fileName: fileName.slice(0, 255),
            blobKey: stored.key,
            sizeBytes: stored.sizeBytes,
            condition: metadata.condition,
            gear: metadata.gear ?? null,
            damperVariant: metadata.damperVariant ?? v.damperVariant,
            testDate: metadata.testDate ?? null,
            notes: metadata.notes,
            uploadedBy: args.uploadedBy,
          })
          .$returningId();
        const id = row!.id;
        await enqueueAnalysis(tx, {
          teamId,
          driveLogId: id,
          settings: jobSettingsFor(v, null),
        });
        added.push({ id, duplicateOf: earlier?.id ?? null });
      }
      return added;
    });
  }

  return {
    teamId,
    vehicle,
    log,
    vehicleLog,

    list(options: { archived?: boolean } = {}) {
      return db
        .select()
        .from(vehicles)
        .where(and(inTeam, options.archived ? undefined : isNull(vehicles.archivedAt)))
        .orderBy(asc(vehicles.name));
    },

    /** True when another vehicle of the team already uses this identifier. */
    async identifierTaken(identifier: string, exceptId?: number) {
      const rows = await db
        .select({ id: vehicles.id })
        .from(vehicles)
        .where(
          and(
            inTeam,
            eq(vehicles.identifier, identifier),
            exceptId ? ne(vehicles.id, exceptId) : undefined,
          ),
        );
      return rows.length > 0;
    },

    async create(input: VehicleInput): Promise<number> {
      const [row] = await db
        .insert(vehicles)
        .values({ ...input, teamId, firingOrderOverride: input.firingOrderOverride ?? null })
        .$returningId();
      return row!.id;
    },

    async update(id: number, input: VehicleInput) {
      await vehicle(id);
      await db
        .update(vehicles)
        .set({
          ...input,
          firingOrderOverride: input.firingOrderOverride ?? null,
          updatedAt: new Date(),
        })
        .where(and(eq(vehicles.id, id), inTeam));
    },

    async setArchived(id: number, archived: boolean) {
      await vehicle(id);
      await db
        .update(vehicles)
        .set({ archivedAt: archived ? new Date() : null })
        .where(and(eq(vehicles.id, id), inTeam));
    },

    async rememberMapping(id: number, mapping: IngestMapping) {
      await vehicle(id);
      await db
        .update(vehicles)
        .set({ columnMapping: mapping })
        .where(and(eq(vehicles.id, id), inTeam));
    },

    logs(vehicleId: number) {
      return db
        .select()
        .from(driveLogs)
        .where(and(eq(driveLogs.vehicleId, vehicleId), eq(driveLogs.teamId, teamId)))
        .orderBy(desc(driveLogs.uploadedAt), desc(driveLogs.id));
    },

    /**
     * The vehicle page's drive-log table in one query: each drive log with the summary columns
     * of its latest analysis (null until one has finished), newest upload first.
     */
    logsWithSummary(vehicleId: number) {
      return db
        .select({
          id: driveLogs.id,
          fileName: driveLogs.fileName,
          condition: driveLogs.condition,
          gear: driveLogs.gear,
          damperVariant: driveLogs.damperVariant,
          testDate: driveLogs.testDate,
          uploadedAt: driveLogs.uploadedAt,
          status: driveLogs.status,
          progress: driveLogs.progress,
          stage: driveLogs.stage,
          error: driveLogs.error,
          latestAnalysisId: driveLogs.latestAnalysisId,
          analysisVersion: analyses.version,
          firingOrder: analyses.firingOrder,
          isolationMinDb: analyses.isolationMinDb,
          isolationMaxDb: analyses.isolationMaxDb,
          rpmMin: analyses.rpmMin,
          rpmMax: analyses.rpmMax,
          rattleVerdict: analyses.rattleVerdict,
          idleAngAccelRadS2: analyses.idleAngAccelRadS2,
        })
        .from(driveLogs)
        .leftJoin(
          analyses,
          and(eq(analyses.id, driveLogs.latestAnalysisId), eq(analyses.teamId, teamId)),
        )
        .where(and(eq(driveLogs.vehicleId, vehicleId), eq(driveLogs.teamId, teamId)))
        .orderBy(desc(driveLogs.uploadedAt), desc(driveLogs.id));
    },

    /**
     * Records an uploaded file as a drive log and queues its analysis, in one transaction.
     * A file already stored for this vehicle is accepted again (scripts must not break) and
     * `duplicateOf` names the earliest drive log with the same content.
     */
    async addLog(args: {
      vehicle: Vehicle;
      fileName: string;
      stored: StoredBlob;
      metadata: LogMetadata;
      uploadedBy: number | null;
    }): Promise<{ id: number; duplicateOf: number | null }> {
      const { fileName, stored, ...rest } = args;
      const [added] = await addLogs({ ...rest, files: [{ fileName, stored }] });
      return added!;
    },

    addLogs,

    /**
     * Queues a new analysis version of a drive log (the older ones are kept). Without a new
     * `mapping`, columns chosen by hand for this drive log before are kept.
     */
    async reanalyse(logId: number, overrides: AnalysisOverrides = {}, mapping?: IngestMapping) {
      const row = await log(logId);
      const v = await vehicle(row.vehicleId);
      const last = mapping ? null : await appliedColumns(row.id);
      const chosen = mapping ?? (last?.source === "chosen" ? last.mapping : null);
      return enqueueAnalysis(db, {
        teamId,
        driveLogId: row.id,
        settings: jobSettingsFor(v, chosen, overrides),
      });
    },

    appliedColumns,

    /** A drive log's analysis versions, newest first, with the settings each was made with. */
    async versions(logId: number) {
      const rows = await db
        .select({
          id: analyses.id,
          version: analyses.version,
          createdAt: analyses.createdAt,
          firingOrder: analyses.firingOrder,
          settings: analyses.settings,
        })
        .from(analyses)
        .where(and(eq(analyses.driveLogId, logId), eq(analyses.teamId, teamId)))
        .orderBy(desc(analyses.version));
      return rows.map(({ settings, ...v }) => {
        // Stored as the signal core wrote them; an old row without a field shows null.
        const known = versionSettings.safeParse(settings);
        return {
          ...v,
          revsPerBlock: known.success ? (known.data.revsPerBlock ?? null) : null,
          binRpm: known.success ? (known.data.binRpm ?? null) : null,
        };
      });
    },

    /**
     * The latest analysis of a drive log, its result checked against the schema (results
     * stored before a field existed get its default); null until one has finished.
     */
    async latestAnalysis(logId: number): Promise<StoredAnalysis | null> {
      const row = await log(logId);
      return row.latestAnalysisId ? readAnalysis(row.id, row.latestAnalysisId) : null;
    },

    /** One analysis version of a drive log, the latest or an earlier one; 404 unless it is this log's. */
    async analysisOf(logId: number, analysisId: number): Promise<StoredAnalysis> {
      const row = await log(logId);
      const found = await readAnalysis(row.id, analysisId);
      if (!found) throw new NotFound("No such analysis version of this drive log.");
      return found;
    },

    /** The stored result JSON of the latest analysis, exactly as the signal core produced it. */
    async latestResult(logId: number): Promise<Record<string, unknown> | null> {
      const row = await log(logId);
      if (!row.latestAnalysisId) return null;
      const [stored] = await db
        .select({ resultGz: analyses.resultGz, orderMapGz: analyses.orderMapGz })
        .from(analyses)
        .where(and(eq(analyses.id, row.latestAnalysisId), eq(analyses.teamId, teamId)));
      if (!stored) return null;
      const result = JSON.parse(gunzipSync(stored.resultGz).toString("utf8")) as Record<
        string,
        unknown
      >;
      const orderMap = JSON.parse(gunzipSync(stored.orderMapGz).toString("utf8")) as unknown;
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
    },
  };
}
