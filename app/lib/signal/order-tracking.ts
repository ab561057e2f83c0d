/**
 * Computed order tracking (Fyfe & Munck, Mech. Syst. Signal Process. 11(2), 1997), crank
 * channel as the reference:
 * 1. crank angle by trapezoidal integration of crank speed (rad/s → rad);
 * 2. optional zero-phase low-pass of both channels (anti-alias, see `chooseAngleGrid`);
 * 3. resampling of both channels to a uniform angle grid of S samples per revolution
 *    (4-point cubic Lagrange interpolation in the sample index);
 * 4. blocks of R revolutions (N = S·R samples, order resolution 1/R) with overlap, a straight
 *    line removed (window-weighted least squares: the speed trend of a run-up or coast-down
 *    inside the block would otherwise leak into orders 1/R…4/R), periodic Hann window,
 *    single-sided 0-peak amplitude (spectrum.ts).
 * Units: angle rad, speed rad/s, time s, orders per crank revolution.
 * Steps 1 and 3 live in angle-grid.ts, step 2 in lowpass.ts; this file cuts the blocks and
 * computes their spectra (step 4).
 */
import { indexAtAngle, resampleBlock, samplesPerRevFor, type AngleGrid } from "./angle-grid.ts";
import { helpedSplit } from "./block-helper.ts";
import type { OrderMap } from "./order-curves.ts";
import { mergeTracked } from "./section-analysis.ts";
import { createPairAmplitudePlan, type Detrend } from "./spectrum.ts";

export interface TrackedBlocks {
  revsPerBlock: number;
  /** Order spacing of the stored bins: 1/R. */
  orderStep: number;
  /** Bins stored per block (orders 0 … (binsPerBlock−1)/R). */
  binsPerBlock: number;
  blockCount: number;
  /** Mean engine speed of each block, rad/s (R revolutions over the block's duration). */
  blockRadS: Float64Array;
  blockStartS: Float64Array;
  blockEndS: Float64Array;
  /**
   * 0-peak angular-velocity amplitude in rad/s, block-major: [block·binsPerBlock + bin], or
   * with `columns` [block·columnsPerBlock + columns[bin]]. Read through ampIndex.
   */
  crankAmp: Float64Array;
  gearboxAmp: Float64Array;
  /**
   * Only some bins stored (the windowed analysis keeps the bins the curves read, and sums the
   * order map and the noise floor as the blocks come: stream/track-windows.ts): the column of
   * each bin, −1 where it is not stored, and the columns per block.
   */
  columns?: Int32Array;
  columnsPerBlock?: number;
  /** The gearbox noise floor of each block, rad/s, when it was taken as the blocks came. */
  noiseFloor?: Float64Array;
  /** The order map, when it was summed as the blocks came. */
  orderMap?: OrderMap;
  /**
   * |C − G| per block at the firing-order bin: the complex crank and gearbox 0-peak amplitudes'
   * difference, rad/s (twist.ts turns it into degrees). Absent unless asked for (`firingBin`).
   */
  twistRadS?: Float64Array;
  /** Blocks dropped because they ran too slowly for an alias-free grid. */
  droppedSlowBlocks: number;
  /** Coarsest and finest samples per revolution used. */
  samplesPerRevRange: [number, number];
}

/** What trackBlocks reads: the log's arrays and the block settings. */
export interface TrackArgs {
  timeS: Float64Array;
  angleRad: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  grid: AngleGrid;
  revsPerBlock: number;
  overlap: number;
  topBin: number;
  /** What each block loses before the window; "linear" (the default) except for comparisons. */
  detrend?: Detrend;
  /**
   * The firing order's bin (q·R, < topBin + 1): fills `twistRadS` per block. Without it nothing
   * more is computed than the amplitudes.
   */
  firingBin?: number;
  /**
   * Only blocks first … end−1 of the whole stretch (block b starts at b·hop revolutions of
   * `angleRad`), for a window of a longer stretch (stream/track-windows.ts). Default: all.
   */
  blockRange?: [number, number];
  onProgress?: (fraction: number) => void;
}

/** Where bin k of block b sits in crankAmp and gearboxAmp; −1 when it is not stored. */
export function ampIndex(t: TrackedBlocks, b: number, k: number): number {
  if (k < 0 || k >= t.binsPerBlock) return -1;
  if (!t.columns) return b * t.binsPerBlock + k;
  const col = t.columns[k]!;
  return col < 0 ? -1 : b * t.columnsPerBlock! + col;
}

/**
 * Blocks that fit a stretch of total angle `totalAngle` (rad): R revolutions each, hop
 * R·(1−overlap).
 */
export function blocksIn(totalAngle: number, revsPerBlock: number, overlap: number): number {
  const R = revsPerBlock;
  const hopRevs = R * (1 - overlap);
  const totalRevs = totalAngle / (2 * Math.PI);
  return totalRevs >= R ? Math.floor((totalRevs - R) / hopRevs + 1e-9) + 1 : 0;
}

/** Blocks that fit the log (blocksIn over its crank angle). */
export function blockCount(args: TrackArgs): number {
  const n = args.angleRad.length;
  return blocksIn(n > 1 ? args.angleRad[n - 1]! : 0, args.revsPerBlock, args.overlap);
}

/**
 * Cuts blocks of R revolutions (hop R·(1−overlap)), resamples both (already filtered) channels
 * of each block to its angle grid and computes the block spectra; the angle-domain signal never
 * sits in memory whole. `angleRad` is the crank angle of each time sample; `topBin` limits the
 * bins kept per block. With the block helper running (block-helper.ts, the CLI starts it) the
 * later blocks are computed on the second core, with the same values.
 */
export function trackBlocks(args: TrackArgs): TrackedBlocks {
  if (args.blockRange) {
    const [first, end] = args.blockRange;
    return trackRange(args, first, end, first);
  }
  const maxBlocks = blockCount(args);
  const split = maxBlocks >= 64 ? helpedSplit(args, maxBlocks) : undefined;
  if (!split) return trackRange(args, 0, maxBlocks, 0);
  const own = trackRange(args, 0, split.from, 0);
  const theirs = split.wait();
  return theirs
    ? mergeTracked([own, theirs], own)
    : mergeTracked([own, trackRange(args, split.from, maxBlocks, split.warmFrom)], own);
}

/**
 * The blocks from..to−1 of trackBlocks, with their values exactly as trackBlocks computes them:
 * a block reuses the previous block's overlapping samples when the grid is the same, so blocks
 * warmFrom..from−1 (at least 1/(1−overlap) of them, for the reused samples to come from the same
 * block as in a run from the start) are resampled first and not kept.
 */
export function trackRange(
  args: TrackArgs,
  fromBlock: number,
  toBlock: number,
  warmFrom: number,
): TrackedBlocks {
  const { timeS, angleRad, crankRadS, gearboxRadS, revsPerBlock: R } = args;
  const n = timeS.length;
  const hopRevs = R * (1 - args.overlap);
  const maxBlocks = toBlock - fromBlock;
  const bins = args.topBin + 1;
  const crankAmp = new Float64Array(maxBlocks * bins);
  const gearboxAmp = new Float64Array(maxBlocks * bins);
  const blockRadS = new Float64Array(maxBlocks);
  const blockStartS = new Float64Array(maxBlocks);
  const blockEndS = new Float64Array(maxBlocks);
  const fb = args.firingBin;
  if (fb !== undefined && !(Number.isInteger(fb) && fb > 0 && fb < bins))
    throw new RangeError(`firingBin must be a whole number from 1 to ${bins - 1}, got ${fb}`);
  const twist = fb !== undefined ? new Float64Array(maxBlocks) : null;
  const plans = new Map<number, ReturnType<typeof createPairAmplitudePlan>>();
  let bufC = new Float64Array(0);
  let bufG = new Float64Array(0);
  let ampC = new Float64Array(0);
  let ampG = new Float64Array(0);
  let kept = 0;
  let dropped = 0;
  let sLo = Infinity;
  let sHi = 0;
  let hint = 0;
  let prevS = 0;
  let prevBlock = -2;
  for (let b = warmFrom; b < toBlock; b++) {
    const keep = b >= fromBlock;
    const thetaA = b * hopRevs * 2 * Math.PI;
    const thetaE = thetaA + 2 * Math.PI * R;
    const ia = indexAtAngle(angleRad, thetaA, hint);
    const ie = indexAtAngle(angleRad, thetaE, ia);
    hint = ia;
    const tAt = (i: number, theta: number) => {
      const span = angleRad[i + 1]! - angleRad[i]!;
      const u = span > 0 ? Math.min(1, (theta - angleRad[i]!) / span) : 0;
      return timeS[i]! + u * (timeS[i + 1]! - timeS[i]!);
    };
    const startS = tAt(ia, thetaA);
    const endS = tAt(ie, thetaE);
    let minRadS = Infinity;
    for (let i = ia; i <= ie + 1 && i < n; i++) minRadS = Math.min(minRadS, crankRadS[i]!);
    const S = samplesPerRevFor(args.grid, minRadS);
    if (S === null || S * R < 2 * (bins - 1)) {
      if (keep) dropped++;
      continue;
    }
    const N = S * R;
    let plan = plans.get(N);
    if (!plan) {
      plan = createPairAmplitudePlan(N, { detrend: args.detrend ?? "linear" });
      plans.set(N, plan);
    }
    if (bufC.length < N) {
      prevS = 0;
      bufC = new Float64Array(N);
      bufG = new Float64Array(N);
      ampC = new Float64Array(plan.bins);
      ampG = new Float64Array(plan.bins);
    }
    // With the same grid as the previous block and a whole number of samples per hop, the
    // overlapping part is already resampled: shift it instead of interpolating it again.
    const hopSamples = hopRevs * S;
    let from = 0;
    if (S === prevS && Number.isInteger(hopSamples) && hopSamples < N && prevBlock === b - 1) {
      bufC.copyWithin(0, hopSamples, N);
      bufG.copyWithin(0, hopSamples, N);
      from = N - hopSamples;
    }
    resampleBlock(
      angleRad,
      crankRadS,
      gearboxRadS,
      ia,
      thetaA,
      (2 * Math.PI) / S,
      from,
      N,
      bufC,
      bufG,
    );
    prevS = S;
    prevBlock = b;
    if (!keep) continue;
    plan.amplitudes(bufC, bufG, ampC, ampG, bins - 1);
    crankAmp.set(ampC.subarray(0, bins), kept * bins);
    gearboxAmp.set(ampG.subarray(0, bins), kept * bins);
    if (twist) twist[kept] = plan.difference(fb!);
    blockRadS[kept] = (2 * Math.PI * R) / Math.max(endS - startS, 1e-12);
    blockStartS[kept] = startS;
    blockEndS[kept] = endS;
    kept++;
    sLo = Math.min(sLo, S);
    sHi = Math.max(sHi, S);
    if (args.onProgress && (b & 255) === 0) args.onProgress((b - fromBlock) / maxBlocks);
  }
  return {
    revsPerBlock: R,
    orderStep: 1 / R,
    binsPerBlock: bins,
    blockCount: kept,
    blockRadS: blockRadS.subarray(0, kept),
    blockStartS: blockStartS.subarray(0, kept),
    blockEndS: blockEndS.subarray(0, kept),
    crankAmp: crankAmp.subarray(0, kept * bins),
    gearboxAmp: gearboxAmp.subarray(0, kept * bins),
    ...(twist ? { twistRadS: twist.subarray(0, kept) } : {}),
    droppedSlowBlocks: dropped,
    samplesPerRevRange: kept > 0 ? [sLo, sHi] : [0, 0],
  };
}
