import { vehicleFiringOrder } from "../domain/vehicle-firing-order";
import type { DriveLogRow, Vehicle } from "../data/vehicles.server";

// The JSON shapes of API v1 (README, "API"). Field names are a public contract: add, never rename.

export function vehicleJson(v: Vehicle) {
  return {
    id: v.id,
    name: v.name,
    identifier: v.identifier,
    cylinders: v.cylinders,
    stroke: v.stroke,
    fuel: v.fuel,
    idleRpm: v.idleRpm,
    /** The firing order the analyses use: the override, or z/2 (four-stroke) / z (two-stroke). */
    firingOrder: vehicleFiringOrder(v),
    firingOrderOverride: v.firingOrderOverride,
    transmissionType: v.transmissionType,
    gearRatios: v.gearRatios,
    damperType: v.damperType,
    damperVariant: v.damperVariant,
    primaryInertiaKgM2: v.primaryInertiaKgM2,
    secondaryInertiaKgM2: v.secondaryInertiaKgM2,
    springRateNmPerDeg: v.springRateNmPerDeg,
    rattleLimitRadS2: v.rattleLimitRadS2,
    /** Stop-to-stop spring travel of the damper, degrees; null when not known. */
    damperTravelLimitDeg: v.damperTravelLimitDeg,
    notes: v.notes,
    archived: v.archivedAt !== null,
    createdAt: v.createdAt.toISOString(),
  };
}

export function logJson(l: DriveLogRow) {
  return {
    id: l.id,
    vehicleId: l.vehicleId,
    fileName: l.fileName,
    sizeBytes: l.sizeBytes,
    status: l.status,
    progress: l.status === "done" ? 1 : Math.round(l.progress * 1000) / 1000,
    stage: l.stage,
    error: l.error
      ? {
          code: l.error.code,
          message: l.error.message,
          row: l.error.row ?? null,
          column: l.error.column ?? null,
        }
      : null,
    condition: l.condition,
    gear: l.gear,
    damperVariant: l.damperVariant,
    testDate: l.testDate,
    notes: l.notes,
    uploadedAt: l.uploadedAt.toISOString(),
    latestAnalysisId: l.latestAnalysisId,
  };
}
