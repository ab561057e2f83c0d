/**
 * Adaptive blocks for start, stop and fast segments (issue 15): computed order tracking whose
 * block length follows the engine — fewer revolutions at low speed and high slew, so the speed
 * changes little inside a block — with the order resolution (1/revolutions) reported per block.
 * CONTRACT STUB: the signature is agreed; the implementation follows.
 */
import type { AngleGrid } from "./angle-grid.ts";

export interface AdaptiveBlock {
  startS: number;
  endS: number;
  /** Mean engine speed of the block, rpm. */
  rpm: number;
  /** Crank revolutions in the block. */
  revs: number;
  /** 1/revs, orders. */
  orderResolution: number;
  /** Firing-order 0-peak amplitudes, rad/s. */
  crankRadS: number;
  gearboxRadS: number;
}

/**
 * Blocks over each span [startIndex, endIndex) of samples. `angleRad` is the crank angle (rad),
 * speeds rad/s, already low-passed like the fixed blocks; `order` the firing order. A block's
 * revolutions are chosen so that its speed changes by at most `maxSpeedChange` (fraction,
 * default 0.05) and the order stays on a bin; `maxRevs` caps them (default: the fixed R).
 */
export function adaptiveBlocks(_args: {
  timeS: Float64Array;
  angleRad: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  grid: AngleGrid;
  order: number;
  spans: readonly { startIndex: number; endIndex: number }[];
  maxRevs: number;
  maxSpeedChange?: number;
}): AdaptiveBlock[] {
  return [];
}
