/**
 * Order curves (amplitude of one order against engine speed) and the order map (blocks × orders)
 * from the tracked blocks. Inputs are 0-peak amplitudes in rad/s; outputs are in rpm
 * (0-peak angular-velocity amplitude), as the result JSON carries them.
 *
 * Binning: a block belongs to the rpm bin whose centre round(rpm/binRpm)·binRpm is nearest its
 * mean engine speed. Within a bin, amplitudes are averaged as power (root-mean-square over
 * blocks), so a bin's value is the amplitude of a steady tone with the same mean power.
 */
import { RPM_PER_RAD_S } from "./firing-order.ts";
import type { TrackedBlocks } from "./order-tracking.ts";

/** Stored bin index for `order` (nearest multiple of 1/R). */
export function orderBin(order: number, revsPerBlock: number): number {
  return Math.round(order * revsPerBlock);
}

export interface BinnedCurve {
  /** Bin centres, rpm, ascending. */
  rpm: number[];
  /** RMS-over-blocks amplitude per bin, rad/s (0-peak). */
  crankRadS: number[];
  gearboxRadS: number[];
  /** Blocks in each bin. */
  blocks: number[];
}

/** Bins one order's block amplitudes by engine speed; `include` can exclude blocks (e.g. noise). */
export function binOrder(
  tracked: TrackedBlocks,
  order: number,
  binRpm: number,
  include?: (block: number) => boolean,
): BinnedCurve {
  const k = orderBin(order, tracked.revsPerBlock);
  const sums = new Map<number, { c: number; g: number; n: number }>();
  if (k >= tracked.binsPerBlock) return { rpm: [], crankRadS: [], gearboxRadS: [], blocks: [] };
  for (let b = 0; b < tracked.blockCount; b++) {
    if (include && !include(b)) continue;
    const bin = Math.round((tracked.blockRadS[b]! * RPM_PER_RAD_S) / binRpm);
    const c = tracked.crankAmp[b * tracked.binsPerBlock + k]!;
    const g = tracked.gearboxAmp[b * tracked.binsPerBlock + k]!;
    const s = sums.get(bin) ?? { c: 0, g: 0, n: 0 };
    s.c += c * c;
    s.g += g * g;
    s.n += 1;
    sums.set(bin, s);
  }
  const keys = [...sums.keys()].sort((a, b) => a - b);
  const out: BinnedCurve = { rpm: [], crankRadS: [], gearboxRadS: [], blocks: [] };
  for (const key of keys) {
    const s = sums.get(key)!;
    out.rpm.push(key * binRpm);
    out.crankRadS.push(Math.sqrt(s.c / s.n));
    out.gearboxRadS.push(Math.sqrt(s.g / s.n));
    out.blocks.push(s.n);
  }
  return out;
}

/** Rounds to a fixed number of decimals so the JSON stays compact (values in rpm). */
export function round(x: number, decimals = 3): number {
  const f = 10 ** decimals;
  return Math.round(x * f) / f;
}

export interface OrderCurve {
  order: number;
  points: { rpm: number; crankRpm: number; gearboxRpm: number; blocks: number }[];
}

export function orderCurve(tracked: TrackedBlocks, order: number, binRpm: number): OrderCurve {
  const c = binOrder(tracked, order, binRpm);
  return {
    order,
    points: c.rpm.map((rpm, i) => ({
      rpm,
      crankRpm: round(c.crankRadS[i]! * RPM_PER_RAD_S),
      gearboxRpm: round(c.gearboxRadS[i]! * RPM_PER_RAD_S),
      blocks: c.blocks[i]!,
    })),
  };
}

export interface OrderMap {
  /** Orders of the columns: 0, orderStep, 2·orderStep, … (count values). */
  orderStep: number;
  orderCount: number;
  /** Per row: mean engine speed (rpm) and mid time (s) of the blocks averaged into it. */
  blockRpm: number[];
  timeS: number[];
  /** Rows × orders, 0-peak amplitude in rpm. */
  crankRpm: number[][];
  gearboxRpm: number[][];
  /** How many consecutive blocks were power-averaged into one row. */
  blocksPerRow: number;
}

/**
 * The order map up to `topOrder`, with consecutive blocks power-averaged in groups so there are
 * at most `maxRows` rows (the chart needs no more, and the JSON stays small).
 */
export function orderMap(tracked: TrackedBlocks, topOrder: number, maxRows = 400): OrderMap {
  const orderCount = Math.min(
    tracked.binsPerBlock,
    Math.floor(topOrder * tracked.revsPerBlock + 1e-9) + 1,
  );
  const per = Math.max(1, Math.ceil(tracked.blockCount / maxRows));
  const map: OrderMap = {
    orderStep: tracked.orderStep,
    orderCount,
    blockRpm: [],
    timeS: [],
    crankRpm: [],
    gearboxRpm: [],
    blocksPerRow: per,
  };
  for (let start = 0; start < tracked.blockCount; start += per) {
    const end = Math.min(start + per, tracked.blockCount);
    const c = new Float64Array(orderCount);
    const g = new Float64Array(orderCount);
    let rad = 0;
    for (let b = start; b < end; b++) {
      rad += tracked.blockRadS[b]!;
      for (let k = 0; k < orderCount; k++) {
        const ac = tracked.crankAmp[b * tracked.binsPerBlock + k]!;
        const ag = tracked.gearboxAmp[b * tracked.binsPerBlock + k]!;
        c[k] = c[k]! + ac * ac;
        g[k] = g[k]! + ag * ag;
      }
    }
    const n = end - start;
    map.blockRpm.push(round((rad / n) * RPM_PER_RAD_S, 1));
    map.timeS.push(round(0.5 * (tracked.blockStartS[start]! + tracked.blockEndS[end - 1]!), 3));
    map.crankRpm.push(Array.from(c, (v) => round(Math.sqrt(v / n) * RPM_PER_RAD_S)));
    map.gearboxRpm.push(Array.from(g, (v) => round(Math.sqrt(v / n) * RPM_PER_RAD_S)));
  }
  return map;
}
