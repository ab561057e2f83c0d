/**
 * The evidence of a sign-off (docs/signoff.md): what a proposal's verdicts rest on, gathered from
 * the vehicle's current state, checked by the claim rules (domain/signoff.ts checkClaims) and
 * frozen into a SignoffRecord. The record's text is its canonical JSON (RFC 8785, the
 * `canonicalize` package), so its SHA-256 — the digest — can be recomputed by anyone from the
 * JSON the API gives out.
 */
import { createHash } from "node:crypto";
import { gunzipSync } from "node:zlib";
import canonicalize from "canonicalize";
import { and, eq, inArray } from "drizzle-orm";
import { analyses, driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { db } from "../infra/db.server";
import { softwareVersion } from "../infra/software-version.server";
import { vehicleFiringOrder } from "../domain/vehicle-firing-order";
import {
  checkClaims,
  type ClaimCheck,
  type ClaimLog,
  type RecordLog,
  type RecordTarget,
  type SignoffInput,
  type SignoffRecord,
} from "../domain/signoff";
import type { TargetVerdict } from "../domain/targets";
import { targetData, toTarget, type TargetRow } from "./targets.server";
import { vehicleData, type DriveLogRow, type Vehicle } from "./vehicles.server";

/** The canonical JSON text of a record (RFC 8785): what is stored and hashed. */
export function canonicalText(record: SignoffRecord): string {
  const text = canonicalize(record);
  if (text === undefined) throw new Error("A sign-off record must be JSON.");
  return text;
}

export function sha256Hex(data: string | Buffer): string {
  return createHash("sha256").update(data).digest("hex");
}

/** A vehicle's figures that verdicts read, as a record holds them. */
export function recordVehicleOf(v: Vehicle): SignoffRecord["vehicle"] {
  return {
    id: v.id,
    identifier: v.identifier,
    name: v.name,
    damperType: v.damperType,
    firingOrder: vehicleFiringOrder(v),
    rattleLimitRadS2: v.rattleLimitRadS2,
    damperTravelLimitDeg: v.damperTravelLimitDeg,
  };
}

/** A target as a record holds it: its values and its last change. */
export function recordTargetOf(row: TargetRow): RecordTarget {
  return { ...toTarget(row), updatedAt: row.updatedAt.toISOString() };
}

/** One analysed drive log as a record holds it (a draft has no result checksum: ""). */
export function recordLogOf(
  row: DriveLogRow,
  analysis: AnalysisOfLog,
  resultSha256: string,
): RecordLog {
  return {
    id: row.id,
    fileName: row.fileName,
    sha256: row.blobKey,
    sizeBytes: row.sizeBytes,
    uploadedAt: row.uploadedAt.toISOString(),
    testDate: row.testDate,
    condition: row.condition,
    gear: row.gear,
    damperVariant: row.damperVariant,
    analysis: {
      id: analysis.id,
      version: analysis.version,
      createdAt: analysis.createdAt.toISOString(),
      settings: analysis.settings,
      resultSha256,
    },
  };
}

/** The analyses row columns a record names. */
export interface AnalysisOfLog {
  id: number;
  version: number;
  createdAt: Date;
  settings: Record<string, unknown>;
}

/** The analyses named by id, of the team, with the columns a record names. */
export async function analysesOf(
  teamId: number,
  ids: readonly number[],
): Promise<(AnalysisOfLog & { driveLogId: number })[]> {
  if (ids.length === 0) return [];
  return db
    .select({
      id: analyses.id,
      driveLogId: analyses.driveLogId,
      version: analyses.version,
      createdAt: analyses.createdAt,
      settings: analyses.settings,
    })
    .from(analyses)
    .where(and(eq(analyses.teamId, teamId), inArray(analyses.id, [...ids])));
}

/** Everything a proposal needs, read at one moment. */
export interface Evidence {
  vehicle: Vehicle;
  targets: RecordTarget[];
  checks: ClaimCheck[];
  problems: string[];
  blocked: boolean;
  /** The claimed drive logs with the analysis their verdicts came from. */
  logs: { row: DriveLogRow; analysis: AnalysisOfLog; verdicts: TargetVerdict[] }[];
}

/** Reads the vehicle's targets and the claimed drive logs, and checks the claims. */
export async function gatherEvidence(
  teamId: number,
  vehicleId: number,
  input: SignoffInput,
): Promise<Evidence> {
  const vehicle = await vehicleData(teamId).vehicle(vehicleId);
  const targetRows = await targetData(teamId).list(vehicle.id);
  const claimedIds = [...new Set(input.claims.flatMap((c) => c.logIds))];
  const rows = claimedIds.length
    ? await db
        .select()
        .from(driveLogs)
        .where(
          and(
            eq(driveLogs.teamId, teamId),
            eq(driveLogs.vehicleId, vehicle.id),
            inArray(driveLogs.id, claimedIds),
          ),
        )
    : [];
  const verdicts = await targetData(teamId).verdictsForLogs(vehicle.id, rows, targetRows);
  const analysisRows = await analysesOf(
    teamId,
    rows.flatMap((r) => (r.latestAnalysisId ? [r.latestAnalysisId] : [])),
  );
  const analysisOf = new Map(analysisRows.map((a) => [a.driveLogId, a]));
  const claimLogs = new Map<number, ClaimLog>(
    rows.map((r) => [
      r.id,
      {
        id: r.id,
        fileName: r.fileName,
        damperVariant: r.damperVariant,
        verdicts: analysisOf.has(r.id) ? (verdicts.get(r.id) ?? null) : null,
      },
    ]),
  );
  const targets = targetRows.map(recordTargetOf);
  const { checks, problems, blocked } = checkClaims({
    targets,
    claims: input.claims,
    deviations: input.deviations ?? [],
    logs: claimLogs,
    damperVariant: input.damperVariant,
  });
  const used = new Set(checks.flatMap((c) => c.logs.map((l) => l.logId)));
  return {
    vehicle,
    targets: targets.filter((t) => checks.some((c) => c.targetId === t.id)),
    checks,
    problems,
    blocked,
    logs: rows
      .filter((r) => used.has(r.id) && analysisOf.has(r.id))
      .sort((a, b) => a.id - b.id)
      .map((row) => ({ row, analysis: analysisOf.get(row.id)!, verdicts: verdicts.get(row.id)! })),
  };
}

/** The record of a proposal: the evidence with the results' hashes, the people and the times. */
export function recordOf(input: {
  signoffId: number;
  team: { id: number; name: string };
  evidence: Evidence;
  damperVariant: string;
  note: string;
  resultGz: ReadonlyMap<number, Buffer>;
  proposedBy: SignoffRecord["proposedBy"];
  proposedAt: Date;
}): SignoffRecord {
  const logs = input.evidence.logs.map(({ row, analysis }) =>
    recordLogOf(row, analysis, sha256Hex(gunzipSync(input.resultGz.get(analysis.id)!))),
  );
  return {
    format: "twistlog-signoff/1",
    signoffId: input.signoffId,
    team: input.team,
    vehicle: recordVehicleOf(input.evidence.vehicle),
    damperVariant: input.damperVariant,
    softwareVersion: softwareVersion(),
    targets: input.evidence.targets,
    claims: input.evidence.checks,
    logs,
    note: input.note,
    proposedBy: input.proposedBy,
    proposedAt: input.proposedAt.toISOString(),
  };
}

/** The words of a blocked proposal: every problem and blocking claim, one sentence each. */
export function blockedMessage(evidence: Pick<Evidence, "checks" | "problems">): string {
  const claims = evidence.checks
    .filter((c) => c.blocking)
    .map((c) => `"${c.targetName}": ${c.detail}`);
  return ["The sign-off cannot be proposed.", ...evidence.problems, ...claims].join(" ");
}
