import { comparisonOrder, referenceSentence } from "../domain/comparison-order";
import type { LogCondition } from "../domain/drive-log-terms";
import { logLabel } from "./curves.server";
import { NotFound } from "../domain/errors";
import type { Vehicle, vehicleData } from "./vehicles.server";

export interface ComparedLog {
  id: number;
  fileName: string;
  condition: LogCondition;
  gear: number | null;
  damperVariant: string;
  testDate: string | null;
  status: string;
  /** True when the drive log has a finished analysis to compare. */
  analysed: boolean;
  /** What the verdict sentence calls it ("variant B", or the drive log's date or number). */
  name: string;
  label: string;
}

/**
 * The drive logs of a comparison, reference first by the rule in comparison-order.ts (analysed
 * ones first: only they can be the reference), whatever order `ids` lists them in, and the
 * sentence that says why. Each must be this vehicle's (404 otherwise, as for any record of
 * another team or vehicle).
 */
export async function comparisonLogs(
  data: ReturnType<typeof vehicleData>,
  vehicle: Vehicle,
  ids: number[],
): Promise<{ logs: ComparedLog[]; referenceNote: string | null }> {
  const rows = await Promise.all(ids.map((id) => data.log(id)));
  for (const row of rows)
    if (row.vehicleId !== vehicle.id)
      throw new NotFound(`Drive log ${row.id} is not one of ${vehicle.identifier}'s.`);
  const distinct = (values: (string | null)[]) =>
    values.every((v) => v) && new Set(values).size === values.length;
  const byVariant = distinct(rows.map((r) => r.damperVariant));
  const byDate = distinct(rows.map((r) => r.testDate));
  const name = (r: (typeof rows)[number]) =>
    byVariant
      ? `variant ${r.damperVariant}`
      : byDate
        ? `the drive log of ${r.testDate}`
        : `drive log ${r.id}`;
  const analysed = comparisonOrder(
    rows.filter((r) => r.latestAnalysisId !== null),
    vehicle.damperVariant,
  );
  const waiting = comparisonOrder(
    rows.filter((r) => r.latestAnalysisId === null),
    vehicle.damperVariant,
  ).ordered;
  const ref = analysed.ordered[0];
  return {
    logs: [...analysed.ordered, ...waiting].map((r) => ({
      id: r.id,
      fileName: r.fileName,
      condition: r.condition,
      gear: r.gear,
      damperVariant: r.damperVariant,
      testDate: r.testDate,
      status: r.status,
      analysed: r.latestAnalysisId !== null,
      name: name(r),
      label: logLabel(r),
    })),
    referenceNote:
      ref && analysed.reason
        ? referenceSentence({ ...ref, name: name(ref) }, analysed.reason, vehicle.damperVariant)
        : null,
  };
}
