/**
 * The firing order of a vehicle, in orders of crank speed: its override when set, else z/2 for
 * a four-stroke and z for a two-stroke. The rule itself is signal/firing-order.ts
 * (effectiveFiringOrder); this only reads it off a vehicle row, where any stroke other than 2
 * counts as four-stroke. Used by the vehicle pages, the API JSON and shared pages alike.
 */
import { effectiveFiringOrder } from "../signal/firing-order";

/** The fields of a vehicle the firing order depends on. */
export interface VehicleEngine {
  cylinders: number;
  stroke: number;
  firingOrderOverride: number | null;
}

/** Orders per crank revolution; null only for a cylinder count the rule cannot use (not 1–24). */
export function vehicleFiringOrder(v: VehicleEngine): number | null {
  return effectiveFiringOrder(v.cylinders, v.stroke === 2 ? 2 : 4, v.firingOrderOverride);
}
