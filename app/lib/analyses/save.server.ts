/**
 * Saving a finished analysis: the analyses row (with the result, encoded by result.server.ts),
 * its relational rows (isolation points, order-curve points, segments), the drive log's status
 * and the job's, in one transaction: all rows or none (docs/architecture.md §5).
 */
import { eq, sql } from "drizzle-orm";
import { writeTransaction } from "../infra/db-errors.server";
import {
  analyses,
  analysisJobs,
  analysisSegments,
  driveLogs,
  isolationPoints,
  orderCurvePoints,
} from "~/lib/infra/db/schema-drive-logs";
import type { AnalysisResult } from "~/lib/signal";
import { largestEventFigures } from "../domain/event-figures";
import type { Db } from "../infra/db.server";
import { stillOurs, type ClaimedJob, type Tx } from "./queue.server";
import { supersedeSignoffs } from "./signoff-supersede.server";
import { encodeResult } from "./result.server";

/** Test hook: called inside the save transaction after the rows are written, before commit. */
export type BeforeCommit = (tx: Tx) => Promise<void>;

/**
 * Saves a finished analysis as the drive log's next version and returns its id. Returns null,
 * writing nothing, when the job was claimed again meanwhile (one version per run).
 */
export async function saveAnalysis(
  db: Db,
  job: ClaimedJob,
  result: AnalysisResult,
  beforeCommit?: BeforeCommit,
): Promise<number | null> {
  return writeTransaction(db, async (tx) => {
    if (!(await stillOurs(tx, job))) return null;
    const [{ latest }] = (await tx
      .select({ latest: sql<number>`COALESCE(MAX(${analyses.version}), 0)`.mapWith(Number) })
      .from(analyses)
      .where(eq(analyses.driveLogId, job.driveLogId))) as [{ latest: number }];
    const measured = result.isolation.filter((p) => p.aboveNoise);
    const dBs = measured.map((p) => p.dB);
    const rpms = result.isolation.map((p) => p.rpm);
    // The trend and the start/stop targets read these columns (issue 15); null without events.
    const events = largestEventFigures(result.events);
    const [row] = await tx
      .insert(analyses)
      .values({
        teamId: job.teamId,
        driveLogId: job.driveLogId,
        version: latest + 1,
        settings: {
          ...result.settings,
          mapping: job.settings.applied?.mapping ?? job.settings.ingest,
          mappingSource: job.settings.applied?.source ?? "chosen",
          ...(job.settings.team
            ? {
                teamChannelNames: job.settings.team.channelNames,
                strictIngest: job.settings.team.strict,
              }
            : {}),
        },
        firingOrder: result.firingOrder,
        isolationMinDb: dBs.length ? Math.min(...dBs) : null,
        isolationMaxDb: dBs.length ? Math.max(...dBs) : null,
        rpmMin: rpms.length ? Math.min(...rpms) : null,
        rpmMax: rpms.length ? Math.max(...rpms) : null,
        resonanceRpm: result.resonance?.rpm ?? null,
        resonanceDb: result.resonance?.isolationDb ?? null,
        rattleVerdict: result.idle?.verdict ?? null,
        idleAngAccelRadS2: result.idle?.gearboxAngAccelRadS2 ?? null,
        modelNaturalHz: result.model?.naturalFrequencyHz ?? null,
        modelDampingRatio: result.model?.dampingRatio ?? null,
        eventPeakDb: events.peakDb,
        eventTwistPpDeg: events.twistPpDeg,
        warnings: result.warnings,
        ...encodeResult(result),
      })
      .$returningId();
    const analysisId = row!.id;
    if (result.isolation.length) {
      await tx.insert(isolationPoints).values(result.isolation.map((p) => ({ analysisId, ...p })));
    }
    const curvePoints = result.orderCurves.flatMap((c) =>
      c.points.map((p) => ({ analysisId, order: c.order, ...p })),
    );
    for (let i = 0; i < curvePoints.length; i += 1000) {
      await tx.insert(orderCurvePoints).values(curvePoints.slice(i, i + 1000));
    }
    if (result.segments.length) {
      await tx
        .insert(analysisSegments)
        .values(result.segments.map((s, seq) => ({ analysisId, seq, ...s })));
    }
    await tx
      .update(driveLogs)
      .set({ status: "done", progress: 1, stage: null, error: null, latestAnalysisId: analysisId })
      .where(eq(driveLogs.id, job.driveLogId));
    await tx
      .update(analysisJobs)
      .set({ status: "done", finishedAt: new Date(), lastError: null })
      .where(eq(analysisJobs.id, job.id));
    if (latest > 0) {
      // A new version of a drive log that a sign-off claims supersedes that sign-off.
      const [log] = await tx
        .select({ vehicleId: driveLogs.vehicleId, fileName: driveLogs.fileName })
        .from(driveLogs)
        .where(eq(driveLogs.id, job.driveLogId));
      if (log)
        await supersedeSignoffs(
          tx,
          job.teamId,
          { vehicleId: log.vehicleId, logIds: [job.driveLogId] },
          `Drive log "${log.fileName}" was re-analysed: version ${latest + 1} replaces version ${latest}.`,
        );
    }
    await beforeCommit?.(tx);
    return analysisId;
  });
}
