/**
 * Adaptive blocks for start, stop and fast segments (issue 15): computed order tracking (Fyfe &
 * Munck 1997, as order-tracking.ts) whose block length follows the engine — fewer revolutions at
 * low speed and high slew, so the speed changes little inside a block — with the order
 * resolution (1/revolutions) reported per block. docs/order-filter.md describes the rule.
 *
 * Revolutions per block R are powers of two (the paired FFT needs S·R = 2^k), at least 2 and
 * with the firing order's bin q·R ≥ 3 (so the order sits two bins or more from the removed trend,
 * and integer orders R bins apart cannot leak into it through the Hann main lobe), and whole
 * multiples of the smallest r0 with q·r0 whole: the firing order then falls on a bin. For q = 2
 * that is 2, 4, 8…; for q = 1.5 it is 2, 4, 8…; a firing order with no such r0 ≤ 64 (q = 4/3)
 * is read at the nearest bin. Of these, the longest with a speed change of at most
 * `maxSpeedChange` is taken, never above `maxRevs` (unless the shortest already is).
 * The speed change of a block is |n(end) − n(start)| / n(mean), each end's speed averaged over
 * one firing period (2π/q of crank angle) so the firing-order fluctuation itself does not count.
 */
import { indexAtAngle, resampleBlock, samplesPerRevFor, type AngleGrid } from "./angle-grid.ts";
import { RPM_PER_RAD_S } from "./firing-order.ts";
import { createPairAmplitudePlan, type PairAmplitudePlan } from "./spectrum.ts";

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
  /** |C − G| at the firing order, rad/s (twist.ts: ÷ 2πf for the twist angle). */
  twistRadS?: number;
  /** Relative speed change inside the block, as the rule above measures it (fraction). */
  speedChange?: number;
}

export const ADAPTIVE_DEFAULTS = { maxSpeedChange: 0.05, overlap: 0.5 } as const;

/** Smallest whole r0 ≤ 64 with q·r0 whole, or null. */
function onBinRevs(q: number): number | null {
  for (let r = 1; r <= 64; r++) if (Math.abs(q * r - Math.round(q * r)) < 1e-9) return r;
  return null;
}

/** Candidate revolutions, shortest first (see top). */
export function adaptiveRevs(q: number, maxRevs: number): number[] {
  const r0 = onBinRevs(q) ?? 1;
  let r = 2;
  while (r < r0 || q * r < 3 - 1e-9) r *= 2;
  const out = [r];
  while (r * 2 <= maxRevs) out.push((r *= 2));
  return out;
}

/**
 * Blocks over each span [startIndex, endIndex) of samples. `angleRad` is the crank angle (rad),
 * speeds rad/s, already low-passed like the fixed blocks; `order` the firing order. A block's
 * revolutions are chosen so that its speed changes by at most `maxSpeedChange` (fraction,
 * default 0.05) and the order stays on a bin; `maxRevs` caps them (default: the fixed R).
 * Blocks overlap by `overlap` (default 0.5); a block too slow for an alias-free grid is skipped.
 */
export function adaptiveBlocks(args: {
  timeS: Float64Array;
  angleRad: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  grid: AngleGrid;
  order: number;
  spans: readonly { startIndex: number; endIndex: number }[];
  maxRevs: number;
  maxSpeedChange?: number;
  overlap?: number;
}): AdaptiveBlock[] {
  const { timeS, angleRad, crankRadS, gearboxRadS, order: q } = args;
  const n = timeS.length;
  const limit = args.maxSpeedChange ?? ADAPTIVE_DEFAULTS.maxSpeedChange;
  const overlap = args.overlap ?? ADAPTIVE_DEFAULTS.overlap;
  if (!(q > 0) || !(limit > 0) || !(overlap >= 0 && overlap < 1))
    throw new RangeError("order and maxSpeedChange must be positive, overlap in [0, 1)");
  const out: AdaptiveBlock[] = [];
  if (n < 4) return out;
  const revs = adaptiveRevs(q, args.maxRevs);
  const plans = new Map<number, PairAmplitudePlan>();
  let bufC = new Float64Array(0);
  let bufG = new Float64Array(0);
  let ampC = new Float64Array(0);
  let ampG = new Float64Array(0);
  let hint = 0;
  const lastAngle = angleRad[n - 1]!;

  /** Time at crank angle θ (linear between samples; clamped to the log). */
  const timeAt = (theta: number): number => {
    const th = Math.min(Math.max(theta, 0), lastAngle);
    const i = indexAtAngle(angleRad, th, 0);
    const span = angleRad[i + 1]! - angleRad[i]!;
    const u = span > 0 ? Math.min(1, (th - angleRad[i]!) / span) : 0;
    return timeS[i]! + u * (timeS[i + 1]! - timeS[i]!);
  };
  /** Speed at θ averaged over one firing period, rad/s. */
  const speedAt = (theta: number): number => {
    const a = Math.max(0, theta - Math.PI / q);
    const b = Math.min(lastAngle, a + (2 * Math.PI) / q);
    return (b - a) / Math.max(timeAt(b) - timeAt(a), 1e-12);
  };

  for (const span of args.spans) {
    const from = Math.max(0, span.startIndex);
    const to = Math.min(n, span.endIndex);
    if (to - from < 4) continue;
    const endAngle = angleRad[to - 1]!;
    let thetaA = angleRad[from]!;
    while (thetaA + 2 * Math.PI * revs[0]! <= endAngle) {
      const tA = timeAt(thetaA);
      const wA = speedAt(thetaA);
      let R = revs[0]!;
      let change = Infinity;
      for (let c = revs.length - 1; c >= 0; c--) {
        const thetaE = thetaA + 2 * Math.PI * revs[c]!;
        if (thetaE > endAngle) continue;
        const mean = (2 * Math.PI * revs[c]!) / Math.max(timeAt(thetaE) - tA, 1e-12);
        const d = Math.abs(speedAt(thetaE) - wA) / mean;
        R = revs[c]!;
        change = d;
        if (d <= limit) break;
      }
      const thetaE = thetaA + 2 * Math.PI * R;
      const ia = indexAtAngle(angleRad, thetaA, hint);
      const ie = indexAtAngle(angleRad, thetaE, ia);
      hint = ia;
      let minRadS = Infinity;
      for (let i = ia; i <= ie + 1 && i < n; i++) minRadS = Math.min(minRadS, crankRadS[i]!);
      const S = samplesPerRevFor(args.grid, minRadS);
      const bin = Math.round(q * R);
      if (S !== null && S * R >= 2 * (bin + 1)) {
        const N = S * R;
        let plan = plans.get(N);
        if (!plan) {
          plan = createPairAmplitudePlan(N, { detrend: "linear" });
          plans.set(N, plan);
        }
        if (bufC.length < N) {
          bufC = new Float64Array(N);
          bufG = new Float64Array(N);
          ampC = new Float64Array(plan.bins);
          ampG = new Float64Array(plan.bins);
        }
        resampleBlock(
          angleRad,
          crankRadS,
          gearboxRadS,
          ia,
          thetaA,
          (2 * Math.PI) / S,
          0,
          N,
          bufC,
          bufG,
        );
        plan.amplitudes(bufC, bufG, ampC, ampG, bin);
        const tE = timeAt(thetaE);
        out.push({
          startS: tA,
          endS: tE,
          rpm: ((2 * Math.PI * R) / Math.max(tE - tA, 1e-12)) * RPM_PER_RAD_S,
          revs: R,
          orderResolution: 1 / R,
          crankRadS: ampC[bin]!,
          gearboxRadS: ampG[bin]!,
          twistRadS: plan.difference(bin),
          speedChange: change,
        });
      }
      thetaA += 2 * Math.PI * R * (1 - overlap);
    }
  }
  return out;
}
