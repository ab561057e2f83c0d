/**
 * Firing (combustion) order and firing frequency.
 *
 * A four-stroke engine fires each cylinder once per two crank revolutions, so z cylinders give
 * z/2 firings per revolution; a two-stroke fires each cylinder every revolution, giving z
 * (Rahnejat et al., "Drivetrain NVH", Encyclopedia of Automotive Engineering, 2014; common
 * practice). Odd firing or cylinder deactivation is handled by an explicit override.
 */

export type Stroke = 2 | 4;

/**
 * Firing order in orders of crank speed (events per crank revolution).
 * Returns null for a cylinder count that is not a positive integer or an unknown stroke.
 */
export function firingOrder(cylinders: number, stroke: Stroke = 4): number | null {
  if (!Number.isInteger(cylinders) || cylinders < 1 || cylinders > 24) return null;
  if (stroke === 4) return cylinders / 2;
  if (stroke === 2) return cylinders;
  return null;
}

/**
 * The firing order an analysis uses, in orders: the explicit override when there is one (odd
 * firing, cylinder deactivation), else firingOrder(cylinders, stroke). The one place this
 * fallback is written; a vehicle's form of it is domain/vehicle-firing-order.ts. Null as
 * firingOrder for an impossible cylinder count or stroke without an override.
 */
export function effectiveFiringOrder(
  cylinders: number,
  stroke: Stroke = 4,
  override?: number | null,
): number | null {
  return override ?? firingOrder(cylinders, stroke);
}

/** Frequency in Hz of order `order` at engine speed `rpm` (rev/min): rpm/60 · order. */
export function orderFrequencyHz(rpm: number, order: number): number {
  return (rpm / 60) * order;
}

/** Angular acceleration amplitude in rad/s² of an order-q fluctuation: α = Δω·q·Ω. */
export function angularAccelerationRadS2(
  amplitudeRadS: number,
  order: number,
  meanRadS: number,
): number {
  return amplitudeRadS * order * meanRadS;
}

export const RPM_PER_RAD_S = 60 / (2 * Math.PI);
export const RAD_S_PER_RPM = (2 * Math.PI) / 60;
