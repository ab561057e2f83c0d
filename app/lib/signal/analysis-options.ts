/**
 * The options of analyseDriveLog (analyse.ts): their defaults, their checks with the message a
 * user sees for a bad value, and the derived firing order, orders of interest and top order
 * (docs/signal-computation.md, steps 1 and 2). Units as named on each option.
 */
import { effectiveFiringOrder, type Stroke } from "./firing-order.ts";

export interface AnalysisOptions {
  /** Cylinder count z. Default 4. */
  cylinders?: number;
  /** 4-stroke (firing order z/2) or 2-stroke (z). Default 4. */
  stroke?: Stroke;
  /** Firing order override (orders per crank revolution), e.g. for cylinder deactivation. Default from z and stroke. */
  firingOrder?: number;
  /** Angle-grid samples per revolution S. Default: chosen so nothing aliases (chooseAngleGrid). */
  samplesPerRev?: number;
  /** Revolutions per block R (order resolution 1/R). Default 8. */
  revsPerBlock?: number;
  /** Block overlap fraction, 0 ≤ overlap < 1. Default 0.5. */
  overlap?: number;
  /** Width of the engine-speed bins of curves and isolation, rpm. Default 50. */
  binRpm?: number;
  /** Rattle limit on gearbox-input angular acceleration, rad/s². Default 500. */
  rattleLimitRadS2?: number;
  /** Extra orders for order curves (beside 0.5, 1, firing order, 2× firing order). */
  orders?: number[];
  /**
   * Measure start, stop and fast spans with the order filter and report events and twist
   * (docs/signal-computation.md, "Transients"). Default true; false gives the blocks-only result
   * (no `transient`, `events`, `twist`), e.g. to time the steady path alone.
   */
  transients?: boolean;
}

export const DEFAULTS = {
  cylinders: 4,
  stroke: 4 as Stroke,
  revsPerBlock: 8,
  overlap: 0.5,
  binRpm: 50,
  rattleLimitRadS2: 500,
};
/** The order map and curves stop at this multiple of the firing order (unless an extra order is higher). */
export const TOP_ORDER_FACTOR = 4;

/** The options after their defaults and checks, with the orders derived from them. */
export interface ResolvedOptions {
  cylinders: number;
  stroke: Stroke;
  /** Orders per crank revolution analysed as the firing order q. */
  firingOrder: number;
  revsPerBlock: number;
  overlap: number;
  binRpm: number;
  rattleLimitRadS2: number;
  /** 0.5, 1, q, 2q and the extra orders, ascending, without repeats. */
  orders: number[];
  /** max(TOP_ORDER_FACTOR · q, the highest of `orders`): the order map and curves stop here. */
  topOrder: number;
  transients: boolean;
}

type Resolved = { ok: true; value: ResolvedOptions } | { ok: false; message: string };

function invalid(message: string): Resolved {
  return { ok: false, message };
}

function isPositive(x: unknown): x is number {
  return typeof x === "number" && Number.isFinite(x) && x > 0;
}

/** Defaults filled in and every option checked; the first bad one comes back as a message. */
export function resolveOptions(o: AnalysisOptions): Resolved {
  const cylinders = o.cylinders ?? DEFAULTS.cylinders;
  const stroke = o.stroke ?? DEFAULTS.stroke;
  const R = o.revsPerBlock ?? DEFAULTS.revsPerBlock;
  const overlap = o.overlap ?? DEFAULTS.overlap;
  const binRpm = o.binRpm ?? DEFAULTS.binRpm;
  const limit = o.rattleLimitRadS2 ?? DEFAULTS.rattleLimitRadS2;
  if (!Number.isInteger(cylinders) || cylinders < 1 || cylinders > 24)
    return invalid(`cylinders must be a whole number from 1 to 24, got ${cylinders}`);
  if (stroke !== 2 && stroke !== 4) return invalid(`stroke must be 2 or 4, got ${String(stroke)}`);
  if (o.firingOrder !== undefined && !isPositive(o.firingOrder))
    return invalid(`firing order must be a positive number, got ${o.firingOrder}`);
  if (!Number.isInteger(R) || R < 1 || R > 256)
    return invalid(`revolutions per block must be a whole number from 1 to 256, got ${R}`);
  if (!(typeof overlap === "number" && overlap >= 0 && overlap < 1))
    return invalid(`overlap must be at least 0 and below 1, got ${overlap}`);
  if (!isPositive(binRpm)) return invalid(`rpm bin width must be a positive number, got ${binRpm}`);
  if (!isPositive(limit))
    return invalid(`rattle limit must be a positive number of rad/s², got ${limit}`);
  if (o.transients !== undefined && typeof o.transients !== "boolean")
    return invalid(`transients must be true or false, got ${String(o.transients)}`);
  for (const q of o.orders ?? [])
    if (!isPositive(q)) return invalid(`orders must be positive numbers, got ${q}`);
  const firingOrder = effectiveFiringOrder(cylinders, stroke, o.firingOrder)!;
  const orders = [...new Set([0.5, 1, firingOrder, 2 * firingOrder, ...(o.orders ?? [])])].sort(
    (a, b) => a - b,
  );
  const topOrder = Math.max(TOP_ORDER_FACTOR * firingOrder, ...orders);
  if (
    o.samplesPerRev !== undefined &&
    (!Number.isInteger(o.samplesPerRev) ||
      o.samplesPerRev / 2 <= topOrder ||
      o.samplesPerRev > 8192)
  ) {
    return invalid(
      `samples per revolution must be a whole number above ${2 * topOrder} (twice the top order ${topOrder}) and at most 8192, got ${o.samplesPerRev}`,
    );
  }
  return {
    ok: true,
    value: {
      cylinders,
      stroke,
      firingOrder,
      revsPerBlock: R,
      overlap,
      binRpm,
      rattleLimitRadS2: limit,
      orders,
      topOrder,
      transients: o.transients ?? true,
    },
  };
}
