/**
 * Damper health over time: a vehicle's trend per damper variant (app/lib/domain/trend.ts), read
 * from each drive log's latest analysis. CONTRACT STUB: the signature is agreed; it answers
 * null (no trend) until the implementation lands.
 */
import type { VehicleTrend } from "../domain/trend";

/** The vehicle's trend, or null when the vehicle is not the team's. */
export async function loadVehicleTrend(
  _teamId: number,
  _vehicleId: number,
): Promise<VehicleTrend | null> {
  return null;
}
