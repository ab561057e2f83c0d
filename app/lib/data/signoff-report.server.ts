/**
 * The evidence report's data (docs/signoff.md): a ReportModel built from a sign-off's frozen
 * record and its copies of the results, or — for a draft of a vehicle's current state — from the
 * latest analyses, then drawn by report/evidence-report.ts. A sign-off's verdicts in the report
 * are computed again from the frozen results and targets, so they are the record's own.
 */
import { gunzipSync } from "node:zlib";
import { asc, eq } from "drizzle-orm";
import { signoffResults } from "~/lib/infra/db/schema-signoffs";
import { analysisResultSchema, type AnalysisResult } from "~/lib/signal";
import { storedResult } from "../analyses/result.server";
import { db } from "../infra/db.server";
import { softwareVersion } from "../infra/software-version.server";
import { CAUTIONS } from "../domain/cautions";
import {
  checkClaims,
  type ClaimLog,
  type RecordLog,
  type SignoffRecord,
  type SignoffState,
} from "../domain/signoff";
import { evaluateTargets } from "../domain/targets";
import { renderEvidenceReport } from "../report/evidence-report";
import type { ReportLog, ReportStep } from "../report/report-model";
import { teamData } from "./team-data.server";
import { targetData } from "./targets.server";
import {
  analysesOf,
  recordLogOf,
  recordTargetOf,
  recordVehicleOf,
} from "./signoff-evidence.server";
import { vehicleData } from "./vehicles.server";

/** The stored result JSON without its order map, checked against the schema. */
const frozenResultSchema = analysisResultSchema.omit({ orderMap: true });
type FrozenResult = Omit<AnalysisResult, "orderMap">;

function verdictsOf(
  record: Pick<SignoffRecord, "targets" | "vehicle">,
  log: RecordLog,
  result: FrozenResult,
) {
  return evaluateTargets(record.targets, log, {
    isolation: result.isolation,
    binRpm: result.settings.binRpm,
    idle: result.idle,
    events: result.events ?? null,
    damperTravelLimitDeg: record.vehicle.damperTravelLimitDeg,
  });
}

/** A sign-off's report as of its record (approved: the stored one is made by this at approval). */
export async function renderSignoffReport(
  teamId: number,
  input: {
    record: SignoffRecord;
    state: SignoffState;
    steps: ReportStep[];
    digest: string | null;
    generatedAt: Date;
    signoffId: number;
  },
): Promise<Buffer> {
  const { record } = input;
  const rows = await db
    .select({ driveLogId: signoffResults.driveLogId, resultGz: signoffResults.resultGz })
    .from(signoffResults)
    .where(eq(signoffResults.signoffId, input.signoffId))
    .orderBy(asc(signoffResults.driveLogId));
  const gz = new Map(rows.map((r) => [r.driveLogId, r.resultGz]));
  const logs: ReportLog[] = record.logs.map((log) => {
    const stored = gz.get(log.id);
    if (!stored)
      throw new Error(`sign-off ${input.signoffId} lacks the result of drive log ${log.id}`);
    const result = frozenResultSchema.parse(JSON.parse(gunzipSync(stored).toString("utf8")));
    return { log, result, verdicts: verdictsOf(record, log, result) };
  });
  const team = await teamData(teamId).team();
  return renderEvidenceReport({
    draft: input.state !== "approved" && !input.digest,
    state: input.state,
    signoffId: input.signoffId,
    vehicle: record.vehicle,
    damperVariant: record.damperVariant,
    programme: record.team.name,
    date: record.approval?.at ?? record.proposedAt,
    generatedAt: input.generatedAt.toISOString(),
    softwareVersion: record.softwareVersion,
    targets: record.targets,
    claims: record.claims,
    logs,
    note: record.note,
    digest: input.digest,
    steps: input.steps,
    cautions: CAUTIONS,
    amplitudeUnit: team.amplitudeUnit,
  });
}

/**
 * A draft report of the vehicle's current state for one damper variant (default: the vehicle's
 * own): every target, judged over every finished drive log of the variant it applies to.
 */
export async function vehicleDraftReport(
  teamId: number,
  vehicleId: number,
  damperVariant?: string,
): Promise<{ pdf: Buffer; fileName: string }> {
  const vehicles = vehicleData(teamId);
  const vehicle = await vehicles.vehicle(vehicleId);
  const variant = damperVariant ?? vehicle.damperVariant;
  const [targetRows, allLogs, team] = await Promise.all([
    targetData(teamId).list(vehicle.id),
    vehicles.logs(vehicle.id),
    teamData(teamId).team(),
  ]);
  const logs = allLogs
    .filter((l) => l.damperVariant === variant && l.latestAnalysisId !== null)
    .sort((a, b) => a.id - b.id);
  const targets = targetRows.map(recordTargetOf);
  const recordVehicle = recordVehicleOf(vehicle);
  const analysisOf = new Map(
    (
      await analysesOf(
        teamId,
        logs.map((l) => l.latestAnalysisId!),
      )
    ).map((a) => [a.id, a]),
  );
  const reportLogs: ReportLog[] = [];
  for (const l of logs) {
    const analysis = analysisOf.get(l.latestAnalysisId!);
    const result = analysis ? await storedResult(analysis.id) : null;
    if (!analysis || !result) continue;
    const log = recordLogOf(l, analysis, "");
    reportLogs.push({
      log,
      result,
      verdicts: verdictsOf({ targets, vehicle: recordVehicle }, log, result),
    });
  }
  const claimLogs = new Map<number, ClaimLog>(
    reportLogs.map((r) => [
      r.log.id,
      { id: r.log.id, fileName: r.log.fileName, damperVariant: variant, verdicts: r.verdicts },
    ]),
  );
  const { checks } = checkClaims({
    targets,
    claims: targets.map((t) => ({
      targetId: t.id,
      logIds: reportLogs
        .filter((r) => r.verdicts.find((v) => v.targetId === t.id)?.status !== "not-applicable")
        .map((r) => r.log.id),
    })),
    deviations: [],
    logs: claimLogs,
    damperVariant: variant,
  });
  const now = new Date();
  const pdf = await renderEvidenceReport({
    draft: true,
    state: "current state",
    signoffId: null,
    vehicle: recordVehicle,
    damperVariant: variant,
    programme: team.name,
    date: now.toISOString(),
    generatedAt: now.toISOString(),
    softwareVersion: softwareVersion(),
    targets,
    claims: checks,
    logs: reportLogs,
    note: "",
    digest: null,
    steps: [],
    cautions: CAUTIONS,
    amplitudeUnit: team.amplitudeUnit,
  });
  const fileName =
    `${vehicle.identifier}-${variant}-draft-${now.toISOString().slice(0, 10)}.pdf`.replace(
      /[^A-Za-z0-9._-]+/g,
      "_",
    );
  return { pdf, fileName };
}
