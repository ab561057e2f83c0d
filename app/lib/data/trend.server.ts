/**
 * Damper health over time: a vehicle's trend per damper variant (app/lib/domain/trend.ts,
 * docs/trend.md), read from each drive log's latest analysis: the model fit and the start/stop
 * peak amplification from the analyses row, the isolation at the team's reference speed from
 * its isolation points (the nearest measured bin within one bin width). A drive log whose latest
 * analysis an approved sign-off rests on is signed off: the first of its variant is the baseline.
 */
import { and, asc, eq, gte, inArray, isNotNull, lte } from "drizzle-orm";
import { analyses, driveLogs, isolationPoints } from "~/lib/infra/db/schema-drive-logs";
import { signoffResults, signoffs } from "~/lib/infra/db/schema-signoffs";
import { transientFiguresOf } from "../analyses/result.server";
import { db } from "../infra/db.server";
import { NotFound } from "../domain/errors";
import {
  isolationNear,
  vehicleTrend,
  type TrendLogInput,
  type VehicleTrend,
} from "../domain/trend";
import { teamData } from "./team-data.server";
import { vehicleData } from "./vehicles.server";

/** The vehicle's trend, or null when the vehicle is not the team's. */
export async function loadVehicleTrend(
  teamId: number,
  vehicleId: number,
): Promise<VehicleTrend | null> {
  const vehicle = await vehicleData(teamId)
    .vehicle(vehicleId)
    .catch((e: unknown) => {
      if (e instanceof NotFound) return null;
      throw e;
    });
  if (!vehicle) return null;
  const { trendReferenceRpm: referenceRpm } = await teamData(teamId).team();
  // Each of the vehicle's drive logs with its latest analysis (scoped by team in the join).
  const rows = await db
    .select({
      logId: driveLogs.id,
      fileName: driveLogs.fileName,
      damperVariant: driveLogs.damperVariant,
      testDate: driveLogs.testDate,
      uploadedAt: driveLogs.uploadedAt,
      analysisId: analyses.id,
      analysisVersion: analyses.version,
      settings: analyses.settings,
      naturalHz: analyses.modelNaturalHz,
      dampingRatio: analyses.modelDampingRatio,
      eventPeakDb: analyses.eventPeakDb,
    })
    .from(driveLogs)
    .innerJoin(
      analyses,
      and(
        eq(analyses.id, driveLogs.latestAnalysisId),
        eq(analyses.driveLogId, driveLogs.id),
        eq(analyses.teamId, teamId),
      ),
    )
    .where(
      and(
        eq(driveLogs.teamId, teamId),
        eq(driveLogs.vehicleId, vehicle.id),
        isNotNull(driveLogs.latestAnalysisId),
      ),
    );
  const binOf = (settings: unknown) => Number((settings as { binRpm?: unknown }).binRpm) || 50;
  const widest = Math.max(50, ...rows.map((r) => binOf(r.settings)));
  const points = rows.length
    ? await db
        .select({
          analysisId: isolationPoints.analysisId,
          rpm: isolationPoints.rpm,
          dB: isolationPoints.dB,
          aboveNoise: isolationPoints.aboveNoise,
        })
        .from(isolationPoints)
        .where(
          and(
            inArray(
              isolationPoints.analysisId,
              rows.map((r) => r.analysisId),
            ),
            gte(isolationPoints.rpm, referenceRpm - widest),
            lte(isolationPoints.rpm, referenceRpm + widest),
          ),
        )
        .orderBy(asc(isolationPoints.analysisId), asc(isolationPoints.rpm))
    : [];
  // The analyses an approved sign-off rests on (issue 16): the baseline of their variant.
  const signed = new Set(
    rows.length
      ? (
          await db
            .select({ analysisId: signoffResults.analysisId })
            .from(signoffResults)
            .innerJoin(signoffs, eq(signoffs.id, signoffResults.signoffId))
            .where(
              and(
                eq(signoffs.teamId, teamId),
                eq(signoffs.vehicleId, vehicle.id),
                eq(signoffs.state, "approved"),
              ),
            )
        ).map((r) => r.analysisId)
      : [],
  );
  // Analyses saved before issue 15 have no model columns: their fit is read from the result.
  const older = rows.filter((r) => r.naturalHz === null).map((r) => r.analysisId);
  const fromResult = older.length
    ? await transientFiguresOf(teamId, older)
    : new Map<number, never>();
  const pointsOf = new Map<number, typeof points>();
  for (const p of points) {
    const list = pointsOf.get(p.analysisId);
    if (list) list.push(p);
    else pointsOf.set(p.analysisId, [p]);
  }
  const logs: TrendLogInput[] = rows.map((r) => {
    const model = r.naturalHz === null ? (fromResult.get(r.analysisId)?.model ?? null) : null;
    return {
      logId: r.logId,
      analysisId: r.analysisId,
      analysisVersion: r.analysisVersion,
      fileName: r.fileName,
      damperVariant: r.damperVariant,
      date: r.testDate ?? r.uploadedAt.toISOString().slice(0, 10),
      dateIsUpload: r.testDate === null,
      naturalFrequencyHz: r.naturalHz ?? model?.naturalFrequencyHz ?? null,
      dampingRatio: r.dampingRatio ?? model?.dampingRatio ?? null,
      isolationAtReferenceDb: isolationNear(
        pointsOf.get(r.analysisId) ?? [],
        referenceRpm,
        binOf(r.settings),
      ),
      startStopPeakAmplificationDb: r.eventPeakDb,
      signedOff: signed.has(r.analysisId),
    };
  });
  return vehicleTrend({ vehicleId: vehicle.id, referenceRpm, logs });
}
