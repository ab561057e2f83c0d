import { and, asc, eq, inArray, isNotNull } from "drizzle-orm";
import {
  analyses,
  driveLogs,
  isolationPoints,
  orderCurvePoints,
} from "~/lib/infra/db/schema-drive-logs";
import type { CurveSet } from "~/lib/domain/curves";
import { db } from "../infra/db.server";
import { conditionLabels } from "../domain/drive-log-terms";

/** A drive log's label in overlays and tables: condition, gear, damper variant, date. */
export function logLabel(log: {
  condition: keyof typeof conditionLabels;
  gear: number | null;
  damperVariant: string;
  testDate: string | null;
}): string {
  const gear = log.gear && log.gear > 0 ? `, gear ${log.gear}` : "";
  return `${conditionLabels[log.condition]}${gear} · ${log.damperVariant}${log.testDate ? ` · ${log.testDate}` : ""}`;
}

/**
 * The isolation curve and the firing-order curve of the latest analysis of each drive log,
 * from the relational tables (docs/architecture.md §5), in the order of `logIds`. Logs of another team or
 * vehicle, and logs without a finished analysis, are left out.
 */
export async function curvesForLogs(
  teamId: number,
  vehicleId: number,
  logIds: number[],
): Promise<CurveSet[]> {
  if (logIds.length === 0) return [];
  const logs = await db
    .select({
      id: driveLogs.id,
      condition: driveLogs.condition,
      gear: driveLogs.gear,
      damperVariant: driveLogs.damperVariant,
      testDate: driveLogs.testDate,
      analysisId: analyses.id,
      firingOrder: analyses.firingOrder,
    })
    .from(driveLogs)
    .innerJoin(analyses, eq(analyses.id, driveLogs.latestAnalysisId))
    .where(
      and(
        eq(driveLogs.teamId, teamId),
        eq(driveLogs.vehicleId, vehicleId),
        inArray(driveLogs.id, logIds),
        isNotNull(driveLogs.latestAnalysisId),
      ),
    );
  if (logs.length === 0) return [];
  const ids = logs.map((l) => l.analysisId);
  const [iso, curves] = await Promise.all([
    db
      .select()
      .from(isolationPoints)
      .where(inArray(isolationPoints.analysisId, ids))
      .orderBy(asc(isolationPoints.analysisId), asc(isolationPoints.rpm)),
    db
      .select()
      .from(orderCurvePoints)
      .where(inArray(orderCurvePoints.analysisId, ids))
      .orderBy(asc(orderCurvePoints.analysisId), asc(orderCurvePoints.rpm)),
  ]);
  const byId = new Map(logs.map((l) => [l.id, l]));
  return logIds.flatMap((id) => {
    const l = byId.get(id);
    if (!l) return [];
    const points = iso.filter((p) => p.analysisId === l.analysisId);
    const fo = curves.filter(
      (p) => p.analysisId === l.analysisId && Math.abs(p.order - l.firingOrder) < 1e-9,
    );
    return [
      {
        logId: l.id,
        label: logLabel(l),
        firingOrderValue: l.firingOrder,
        isolation: { rpm: points.map((p) => p.rpm), dB: points.map((p) => p.dB) },
        firingOrder: {
          rpm: fo.map((p) => p.rpm),
          crankRpm: fo.map((p) => p.crankRpm),
          gearboxRpm: fo.map((p) => p.gearboxRpm),
        },
      },
    ];
  });
}

/** `?logs=3,5,8` → [3, 5, 8]: whole positive ids, duplicates dropped, at most `max`. */
export function parseLogIds(value: string | null, max = 8): number[] | null {
  if (!value) return [];
  const parts = value.split(",").map((s) => s.trim());
  if (parts.some((p) => !/^\d{1,15}$/.test(p))) return null;
  const ids = [...new Set(parts.map(Number))].filter((n) => Number.isSafeInteger(n) && n > 0);
  return ids.length > max ? null : ids;
}
