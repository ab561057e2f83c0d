import { and, asc, desc, eq, inArray, isNull, ne } from "drizzle-orm";
import { writeTransaction } from "../infra/db-errors.server";
import { z } from "zod";
import { analyses, analysisJobs, driveLogs, vehicles } from "~/lib/infra/db/schema-drive-logs";
import type { NewJob, Tx } from "../analyses/queue.server";
import { decodeStoredJson, storedResult, type StoredAnalysis } from "../analyses/result.server";
import { jobSettingsFor, type AnalysisOverrides, type JobSettings } from "../analyses/settings";
import { db } from "../infra/db.server";
import type { AppliedMapping, IngestMapping } from "../domain/drive-log-terms";
import { NotFound } from "../domain/errors";
import { teamData } from "./team-data.server";
import { removeDriveLog, type RemovalActor } from "./drive-log-removal.server";
import { supersedeSignoffs, type SupersedeActor } from "../analyses/signoff-supersede.server";
import { vehicleFiringOrder } from "../domain/vehicle-firing-order";
import type { StoredBlob } from "../infra/storage.server";
import type { LogMetadata, VehicleInput } from "../domain/vehicle-schema";

export type Vehicle = typeof vehicles.$inferSelect;
export type DriveLogRow = typeof driveLogs.$inferSelect;

export type { AnalysisOverrides, StoredAnalysis };

/** The two settings of analyses.settings the version list names (besides the firing order). */
const versionSettings = z.looseObject({
  revsPerBlock: z.number().optional(),
  binRpm: z.number().optional(),
  // The team's channel names and strict flag the run read with (absent before issue 14).
  teamChannelNames: z
    .array(z.object({ name: z.string(), role: z.string(), unit: z.string().optional() }))
    .optional(),
  strictIngest: z.boolean().optional(),
});

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

  /** The settings of the drive log's last finished job, or null. */
  async function lastJobSettings(logId: number): Promise<JobSettings | null> {
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
    return job ? (job.settings as unknown as JobSettings) : null;
  }

  /** The columns the drive log's last finished run read (and where they came from), or null. */
  async function appliedColumns(logId: number): Promise<AppliedMapping | null> {
    const settings = await lastJobSettings(logId);
    if (!settings) return null;
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
    const result = await storedResult(stored.id);
    return result ? { ...stored, result } : null;
  }

  /**
   * addLog for several files with the same test details, all in one transaction (the caller's
   * when given `within`, so their analysis jobs commit with them): a failure (the database went
   * away) records none of them, so the upload can simply be sent again. Queues no analysis
   * (app/lib/data/drive-log-intake.server.ts does both).
   */
  async function addLogs(
    args: {
      vehicle: Vehicle;
      files: { fileName: string; stored: StoredBlob }[];
      metadata: LogMetadata;
      uploadedBy: number | null;
    },
    within?: Tx,
  ): Promise<{ id: number; duplicateOf: number | null }[]> {
    const { vehicle: v, metadata } = args;
    const write = async (tx: Tx) => {
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
        added.push({ id: row!.id, duplicateOf: earlier?.id ?? null });
      }
      return added;
    };
    return within ? write(within) : writeTransaction(db, write);
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
        .values({
          ...input,
          teamId,
          firingOrderOverride: input.firingOrderOverride ?? null,
          damperTravelLimitDeg: input.damperTravelLimitDeg ?? null,
        })
        .$returningId();
      return row!.id;
    },

    /**
     * Changes a vehicle. A change of what verdicts read (firing order, rattle limit, damper
     * travel limit) supersedes its open sign-offs in the same transaction.
     */
    async update(id: number, input: VehicleInput, actor: SupersedeActor = null) {
      const before = await vehicle(id);
      const after = {
        ...input,
        firingOrderOverride: input.firingOrderOverride ?? null,
        // An emptied field clears the limit (undefined would leave the old one).
        damperTravelLimitDeg: input.damperTravelLimitDeg ?? null,
      };
      const figures = (
        v: Parameters<typeof vehicleFiringOrder>[0] &
          Pick<Vehicle, "rattleLimitRadS2" | "damperTravelLimitDeg">,
      ) => JSON.stringify([vehicleFiringOrder(v), v.rattleLimitRadS2, v.damperTravelLimitDeg]);
      await writeTransaction(db, async (tx) => {
        await tx
          .update(vehicles)
          .set({ ...after, updatedAt: new Date() })
          .where(and(eq(vehicles.id, id), inTeam));
        if (figures(after) !== figures(before))
          await supersedeSignoffs(
            tx,
            teamId,
            { vehicleId: id, vehicleFigures: true },
            "The vehicle's firing order, rattle limit or damper travel limit was changed.",
            actor,
          );
      });
    },

    /** Deletes a drive log (./drive-log-removal.server.ts): engineer and up, audited. */
    removeLog(logId: number, actor: RemovalActor) {
      return removeDriveLog(teamId, logId, actor);
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
     * Records an uploaded file as a drive log (no analysis is queued: see addLogs). A file
     * already stored for this vehicle is accepted again (scripts must not break) and
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
     * The job of a new analysis version of a drive log (the older ones are kept), for
     * queueAnalysis (app/lib/analyses/requests.server.ts). Without a new `mapping`, columns
     * chosen by hand for this drive log before are kept.
     */
    async reanalysisJob(
      logId: number,
      overrides: AnalysisOverrides = {},
      mapping?: IngestMapping,
    ): Promise<NewJob> {
      const row = await log(logId);
      const v = await vehicle(row.vehicleId);
      const last = mapping ? null : await appliedColumns(row.id);
      const chosen = mapping ?? (last?.source === "chosen" ? last.mapping : null);
      // A re-analysis reads with the team's channel names as they are now (and records them).
      const team = await teamData(teamId).ingestSettings();
      return { teamId, driveLogId: row.id, settings: jobSettingsFor(v, chosen, overrides, team) };
    },

    appliedColumns,

    /**
     * Takes the file's own date and comment as the drive log's test date and notes, each only
     * where it is still empty (checked in the update itself, so a concurrent edit is never
     * overwritten). Returns which of the two were set.
     */
    async fillTestDetails(logId: number, details: { testDate?: string; notes?: string }) {
      const row = await log(logId);
      const set: { date: boolean; notes: boolean } = { date: false, notes: false };
      if (details.testDate) {
        const [r] = await db
          .update(driveLogs)
          .set({ testDate: details.testDate })
          .where(
            and(eq(driveLogs.id, row.id), eq(driveLogs.teamId, teamId), isNull(driveLogs.testDate)),
          );
        set.date = r.affectedRows > 0;
      }
      if (details.notes) {
        const [r] = await db
          .update(driveLogs)
          .set({ notes: details.notes.slice(0, 5000) })
          .where(
            and(eq(driveLogs.id, row.id), eq(driveLogs.teamId, teamId), eq(driveLogs.notes, "")),
          );
        set.notes = r.affectedRows > 0;
      }
      return set;
    },

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
          team:
            known.success && known.data.strictIngest !== undefined
              ? {
                  channelNames: known.data.teamChannelNames ?? [],
                  strict: known.data.strictIngest,
                }
              : null,
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
      return stored ? decodeStoredJson(stored) : null;
    },
  };
}
