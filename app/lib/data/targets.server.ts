import { and, asc, eq, isNotNull } from "drizzle-orm";
import { writeTransaction } from "../infra/db-errors.server";
import { analyses, driveLogs, isolationPoints } from "~/lib/infra/db/schema-drive-logs";
import { targets } from "~/lib/infra/db/schema-results";
import type { AnalysisResult } from "~/lib/signal";
import {
  idleFiguresOf,
  transientFiguresOf,
  type IdleFigures,
  type TransientFigures,
} from "../analyses/result.server";
import { db } from "../infra/db.server";
import { supersedeSignoffs, type SupersedeActor } from "../analyses/signoff-supersede.server";
import type { Tx } from "../analyses/queue.server";
import type { LogCondition } from "../domain/drive-log-terms";
import { NotFound } from "../domain/errors";
import {
  evaluateTargets,
  outOfScope,
  type Target,
  type TargetInput,
  type TargetVerdict,
} from "../domain/targets";
import { vehicleData } from "./vehicles.server";

export type TargetRow = typeof targets.$inferSelect;

/** The evaluation's view of a stored target. */
export function toTarget(row: TargetRow): Target {
  return {
    id: row.id,
    name: row.name,
    kind: row.kind,
    rpmFrom: row.rpmFrom,
    rpmTo: row.rpmTo,
    minDb: row.minDb,
    maxRadS2: row.maxRadS2,
    maxDb: row.maxDb,
    minMarginDeg: row.minMarginDeg,
    conditions: row.conditions,
    gears: row.gears,
  };
}

/** The columns of a target; the other kinds' columns are cleared. */
function columns(input: TargetInput) {
  return {
    kind: input.kind,
    name: input.name,
    rpmFrom: input.kind === "isolation" ? input.rpmFrom : null,
    rpmTo: input.kind === "isolation" ? input.rpmTo : null,
    minDb: input.kind === "isolation" ? input.minDb : null,
    maxRadS2: input.kind === "rattle" ? input.maxRadS2 : null,
    maxDb: input.kind === "start-stop" ? input.maxDb : null,
    minMarginDeg: input.kind === "twist-margin" ? input.minMarginDeg : null,
    conditions: input.conditions,
    gears: input.gears,
  };
}

export type { IdleFigures };

/** What a table row needs to be judged: the log's condition and gear and its latest analysis. */
export interface LogForVerdicts {
  id: number;
  condition: LogCondition;
  gear: number | null;
  latestAnalysisId: number | null;
}

/**
 * Every read and write of a team's targets (docs/architecture.md §2): another team's target or vehicle is a
 * 404, like one that does not exist. Verdicts are computed when asked for, from the stored
 * analysis (docs/targets.md), so a changed target applies to every drive log at once.
 */
export function targetData(teamId: number) {
  const inTeam = eq(targets.teamId, teamId);

  async function get(id: number): Promise<TargetRow> {
    const [row] = await db
      .select()
      .from(targets)
      .where(and(eq(targets.id, id), inTeam));
    if (!row) throw new NotFound("No such target in this team.");
    return row;
  }

  /** The open sign-offs claiming the target are superseded (inside the change's transaction). */
  function supersedeFor(tx: Tx, target: TargetRow, what: string, actor: SupersedeActor) {
    return supersedeSignoffs(
      tx,
      teamId,
      { vehicleId: target.vehicleId, targetIds: [target.id] },
      `Target "${target.name}" was ${what}.`,
      actor,
    );
  }

  function list(vehicleId: number): Promise<TargetRow[]> {
    return db
      .select()
      .from(targets)
      .where(and(eq(targets.vehicleId, vehicleId), inTeam))
      .orderBy(asc(targets.kind), asc(targets.rpmFrom), asc(targets.name), asc(targets.id));
  }

  /**
   * The idle figures of these analyses of the team (null: no idle segment): the time-domain
   * idle peak (rad/s²) and idle speed (rpm) are only in the result JSON, read and kept by the
   * analyses' cache (result.server.ts).
   */
  function idleFigures(analysisIds: number[]): Promise<Map<number, IdleFigures | null>> {
    return idleFiguresOf(teamId, analysisIds);
  }

  return {
    teamId,
    get,
    list,
    idleFigures,

    async create(vehicleId: number, input: TargetInput, userId: number | null): Promise<number> {
      const vehicle = await vehicleData(teamId).vehicle(vehicleId);
      const [row] = await db
        .insert(targets)
        .values({ ...columns(input), teamId, vehicleId: vehicle.id, createdBy: userId })
        .$returningId();
      return row!.id;
    },

    /**
     * Changes a target; a change of its name, kind, limit or scope supersedes the open sign-offs
     * claiming it, in the same transaction.
     */
    async update(id: number, input: TargetInput, actor: SupersedeActor = null): Promise<void> {
      const before = await get(id);
      const same =
        JSON.stringify(toTarget(before)) ===
        JSON.stringify(toTarget({ ...before, ...columns(input) }));
      await writeTransaction(db, async (tx) => {
        await tx
          .update(targets)
          .set({ ...columns(input), updatedAt: new Date() })
          .where(and(eq(targets.id, id), inTeam));
        // Saving it unchanged supersedes nothing.
        if (!same) await supersedeFor(tx, before, "changed", actor);
      });
    },

    /** Deletes a target; open sign-offs claiming it are superseded in the same transaction. */
    async remove(id: number, actor: SupersedeActor = null): Promise<void> {
      const before = await get(id);
      await writeTransaction(db, async (tx) => {
        await tx.delete(targets).where(and(eq(targets.id, id), inTeam));
        await supersedeFor(tx, before, "deleted", actor);
      });
    },

    /**
     * Verdicts of each finished drive log of the vehicle against its targets (`rows`, or the
     * stored ones), keyed by drive-log id; logs without an analysis are left out. One query for
     * the analyses, one for all their isolation points, and the idle peaks (cached) only where
     * a rattle target can apply.
     */
    async verdictsForLogs(
      vehicleId: number,
      logs: readonly LogForVerdicts[],
      rows?: readonly TargetRow[],
    ): Promise<Map<number, TargetVerdict[]>> {
      const out = new Map<number, TargetVerdict[]>();
      const all = (rows ?? (await list(vehicleId))).filter((t) => t.vehicleId === vehicleId);
      const finished = logs.filter((l) => l.latestAnalysisId !== null);
      if (all.length === 0 || finished.length === 0) {
        for (const l of finished) out.set(l.id, []);
        return out;
      }
      const judged = all.map(toTarget);
      // The latest analysis of each of the vehicle's logs, scoped by team and vehicle in the join.
      const latest = and(
        eq(driveLogs.teamId, teamId),
        eq(driveLogs.vehicleId, vehicleId),
        isNotNull(driveLogs.latestAnalysisId),
      );
      // The analysis must be the log's own latest one (never another log's).
      const ofLog = and(
        eq(analyses.id, driveLogs.latestAnalysisId),
        eq(analyses.driveLogId, driveLogs.id),
        eq(analyses.teamId, teamId),
      );
      const wanted = judged.some((t) => t.kind === "isolation");
      const [summaries, points] = await Promise.all([
        db
          .select({
            logId: driveLogs.id,
            analysisId: analyses.id,
            settings: analyses.settings,
            idleAngAccelRadS2: analyses.idleAngAccelRadS2,
          })
          .from(driveLogs)
          .innerJoin(analyses, ofLog)
          .where(latest),
        wanted
          ? db
              .select({
                analysisId: isolationPoints.analysisId,
                rpm: isolationPoints.rpm,
                dB: isolationPoints.dB,
                aboveNoise: isolationPoints.aboveNoise,
              })
              .from(isolationPoints)
              .innerJoin(analyses, eq(analyses.id, isolationPoints.analysisId))
              .innerJoin(driveLogs, ofLog)
              .where(latest)
              .orderBy(asc(isolationPoints.analysisId), asc(isolationPoints.rpm))
          : Promise.resolve([]),
      ]);
      const byAnalysis = new Map<number, { rpm: number; dB: number; aboveNoise: boolean }[]>();
      for (const p of points) {
        const bucket = byAnalysis.get(p.analysisId) ?? [];
        bucket.push({ rpm: p.rpm, dB: p.dB, aboveNoise: p.aboveNoise });
        byAnalysis.set(p.analysisId, bucket);
      }
      const summaryOf = new Map(summaries.map((s) => [s.logId, s]));
      const rattleTargets = judged.filter((t) => t.kind === "rattle");
      const needIdle = finished.filter((l) => {
        const s = summaryOf.get(l.id);
        return (
          s && s.idleAngAccelRadS2 !== null && rattleTargets.some((t) => outOfScope(t, l) === null)
        );
      });
      const figures = needIdle.length
        ? await idleFigures(needIdle.map((l) => summaryOf.get(l.id)!.analysisId))
        : new Map<number, IdleFigures | null>();
      // Start/stop targets read each event, which only the result JSON holds (kept once read).
      const travel = (await vehicleData(teamId).vehicle(vehicleId)).damperTravelLimitDeg;
      const eventTargets = judged.filter(
        (t) => t.kind === "start-stop" || (t.kind === "twist-margin" && travel !== null),
      );
      const needEvents = finished.filter(
        (l) => summaryOf.has(l.id) && eventTargets.some((t) => outOfScope(t, l) === null),
      );
      const transients = needEvents.length
        ? await transientFiguresOf(
            teamId,
            needEvents.map((l) => summaryOf.get(l.id)!.analysisId),
          )
        : new Map<number, TransientFigures>();
      for (const l of finished) {
        const s = summaryOf.get(l.id);
        if (!s || s.analysisId !== l.latestAnalysisId) continue;
        const binRpm = Number((s.settings as { binRpm?: unknown }).binRpm) || 50;
        const amp = s.idleAngAccelRadS2;
        const idle = figures.get(s.analysisId);
        out.set(
          l.id,
          evaluateTargets(judged, l, {
            isolation: byAnalysis.get(s.analysisId) ?? [],
            binRpm,
            idle:
              amp === null
                ? null
                : {
                    gearboxAngAccelRadS2: amp,
                    // Without the stored peak (an unreadable result) the order amplitude alone.
                    gearboxAngAccelPeakRadS2: idle?.peakRadS2 ?? amp,
                    ...(idle ? { meanRpm: idle.meanRpm } : {}),
                  },
            events: transients.get(s.analysisId)?.events ?? null,
            damperTravelLimitDeg: travel,
          }),
        );
      }
      return out;
    },

    /** Verdicts of one analysis (the drive-log page has the result already). */
    async verdictsForAnalysis(
      vehicleId: number,
      log: { condition: LogCondition; gear: number | null },
      result: Pick<AnalysisResult, "isolation" | "settings" | "idle" | "events">,
    ): Promise<TargetVerdict[]> {
      const [rows, vehicle] = await Promise.all([
        list(vehicleId),
        vehicleData(teamId).vehicle(vehicleId),
      ]);
      return evaluateTargets(rows.map(toTarget), log, {
        isolation: result.isolation,
        binRpm: result.settings.binRpm,
        idle: result.idle,
        events: result.events ?? null,
        damperTravelLimitDeg: vehicle.damperTravelLimitDeg,
      });
    },
  };
}
