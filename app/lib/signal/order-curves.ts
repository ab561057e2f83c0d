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
import { ampIndex, type TrackedBlocks } from "./order-tracking.ts";

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
  if (tracked.blockCount === 0 || ampIndex(tracked, 0, k) < 0)
    return { rpm: [], crankRadS: [], gearboxRadS: [], blocks: [] };
  for (let b = 0; b < tracked.blockCount; b++) {
    if (include && !include(b)) continue;
    const bin = Math.round((tracked.blockRadS[b]! * RPM_PER_RAD_S) / binRpm);
    const at = ampIndex(tracked, b, k);
    const c = tracked.crankAmp[at]!;
    const g = tracked.gearboxAmp[at]!;
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

/** Rows of the order map: at most this many (the chart needs no more; the JSON stays small). */
export const MAP_ROWS = 400;

/** Columns of the order map: orders 0 … topOrder, as far as the blocks' bins reach. */
export function mapColumns(binsPerBlock: number, revsPerBlock: number, topOrder: number): number {
  return Math.min(binsPerBlock, Math.floor(topOrder * revsPerBlock + 1e-9) + 1);
}

/**
 * Blocks power-averaged per row of the order map, from the block positions of the log (kept
 * and dropped: a number known before the blocks are computed, so the windowed analysis can sum
 * the rows as the blocks come).
 */
export function blocksPerMapRow(blockPositions: number): number {
  return Math.max(1, Math.ceil(blockPositions / MAP_ROWS));
}

/**
 * The order map summed block by block, in order: `add` each kept block's spectra (bins from 0),
 * then `finish`. Consecutive blocks are power-averaged in groups of `per`.
 */
export class OrderMapRows {
  private readonly map: OrderMap;
  private c: Float64Array;
  private g: Float64Array;
  private rad = 0;
  private n = 0;
  private startS = 0;
  private endS = 0;
  constructor(
    orderStep: number,
    private readonly orderCount: number,
    private readonly per: number,
  ) {
    this.map = {
      orderStep,
      orderCount,
      blockRpm: [],
      timeS: [],
      crankRpm: [],
      gearboxRpm: [],
      blocksPerRow: per,
    };
    this.c = new Float64Array(orderCount);
    this.g = new Float64Array(orderCount);
  }

  /** One block: its mean speed (rad/s), times (s), and spectra whose bin k is at [at + k]. */
  add(
    radS: number,
    startS: number,
    endS: number,
    crank: Float64Array,
    gearbox: Float64Array,
    at: number,
  ): void {
    if (this.n === 0) this.startS = startS;
    this.rad += radS;
    for (let k = 0; k < this.orderCount; k++) {
      const ac = crank[at + k]!;
      const ag = gearbox[at + k]!;
      this.c[k] = this.c[k]! + ac * ac;
      this.g[k] = this.g[k]! + ag * ag;
    }
    this.endS = endS;
    if (++this.n === this.per) this.row();
  }

  private row(): void {
    const { n, map } = this;
    map.blockRpm.push(round((this.rad / n) * RPM_PER_RAD_S, 1));
    map.timeS.push(round(0.5 * (this.startS + this.endS), 3));
    map.crankRpm.push(Array.from(this.c, (v) => round(Math.sqrt(v / n) * RPM_PER_RAD_S)));
    map.gearboxRpm.push(Array.from(this.g, (v) => round(Math.sqrt(v / n) * RPM_PER_RAD_S)));
    this.c = new Float64Array(this.orderCount);
    this.g = new Float64Array(this.orderCount);
    this.rad = 0;
    this.n = 0;
  }

  finish(): OrderMap {
    if (this.n > 0) this.row();
    return this.map;
  }
}

/**
 * The order map up to `topOrder`: consecutive blocks power-averaged in rows (OrderMapRows,
 * blocksPerMapRow). The windowed analysis hands in the map it summed as the blocks came.
 */
export function orderMap(tracked: TrackedBlocks, topOrder: number): OrderMap {
  if (tracked.orderMap) return tracked.orderMap;
  const bins = tracked.binsPerBlock;
  const rows = new OrderMapRows(
    tracked.orderStep,
    mapColumns(bins, tracked.revsPerBlock, topOrder),
    blocksPerMapRow(tracked.blockCount + tracked.droppedSlowBlocks),
  );
  for (let b = 0; b < tracked.blockCount; b++)
    rows.add(
      tracked.blockRadS[b]!,
      tracked.blockStartS[b]!,
      tracked.blockEndS[b]!,
      tracked.crankAmp,
      tracked.gearboxAmp,
      b * bins,
    );
  return rows.finish();
}
