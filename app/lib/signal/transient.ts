/**
 * Transients (issue 15; docs/signal-computation.md, "Transients"): where the engine speed changes
 * too fast for the fixed blocks of R revolutions, the firing order is measured sample by sample
 * with the Vold–Kalman order filter (vold-kalman.ts) instead.
 *
 * Slew rule: a block of R revolutions lasts 60·R/n s at n rpm; the fixed blocks are kept where the
 * speed changes by at most MAX_SPEED_CHANGE_PER_BLOCK (5 %) of itself within one block, i.e.
 * |dn/dt| ≤ 0.05·n²/(60·R) rpm/s (R = 8: 26 rpm/s at 500 rpm, 67 at 800, 104 at 1000, 417 at
 * 2000, 938 at 3000). It is read from the crank angle: for every FRAME_S the mean speeds of the
 * half block (R/2 revolutions) before and after that instant, n1 and n2; the change over the whole
 * block is 2·|n2 − n1| (two half-block means of a ramp lie half a block apart). Averaging over
 * whole revolutions keeps the firing-order ripple out of the slew. Fast frames closer than
 * MERGE_GAP_S are joined into one span.
 *
 * Span kinds: a stop falls from running speed (≥ 0.6 × idle) to cranking speed (< 0.4 × idle),
 * a start rises the other way, each crossing taking at most 3 s (the rule of segments.ts);
 * anything else is "fast" (a pull in a low gear, a sharp coast-down).
 */
import { indexAtAngle } from "./angle-grid.ts";
import { RPM_PER_RAD_S } from "./firing-order.ts";

/** Largest speed change within one fixed block (fraction of the speed) before a span is fast. */
export const MAX_SPEED_CHANGE_PER_BLOCK = 0.05;
/** slewThresholdRpmS in the result is the slew limit at this engine speed, rpm. */
export const SLEW_REFERENCE_RPM = 1000;
/** The order filter's settings for fast spans (vold-kalman.ts). */
export const TRANSIENT_FILTER = {
  poles: 3 as const,
  /**
   * Half-power bandwidth, one side, in orders. With three poles 0.25 orders keeps order q ± 0.5
   * 29 dB down (Tůma 2005, eq. 8) and follows a damper resonance with ζ = 0.1 crossed at
   * 200 rpm/s within 1 dB (transient-analytic.test.ts); two poles at 0.2 orders were 1.1 dB off
   * there (docs/order-filter.md), and wider bands let the half orders of a start in.
   */
  bandwidthOrders: 0.25,
  minBandwidthHz: 0.3,
};
/** The firing order counts as resolved where its frequency is at least this many bandwidths. */
export const RESOLVE_RATIO = 3;
/**
 * The speed may change by at most this fraction of itself within one period of the order for the
 * filter's reading to count: faster than that (the last half second of a stop, the kick of a
 * start) the slow trend lags the speed and what it leaves behind leaks into the order's band.
 */
export const MAX_CHANGE_PER_FIRING = 0.15;
/** Below this block-mean speed the engine stands (no slew, no order), rpm. */
export const STANDSTILL_RPM = 20;
/** Frames the slew is read in, s. */
export const FAST_FRAME_S = 0.05;
const FRAME_S = FAST_FRAME_S;
const MERGE_GAP_S = 0.5;
const CROSSING_S = 3;

export function slewLimitRpmS(rpm: number, revsPerBlock: number): number {
  return (MAX_SPEED_CHANGE_PER_BLOCK * rpm * rpm) / (60 * revsPerBlock);
}

export type SpanKind = "start" | "stop" | "fast";

export interface FastSpan {
  kind: SpanKind;
  /** Sample indices into the arrays given, end exclusive. */
  startIndex: number;
  endIndex: number;
  startS: number;
  endS: number;
}

/** Time at crank angle theta (linear between samples), clamped to the log. */
function timeAtAngle(angle: Float64Array, timeS: Float64Array, theta: number, hint: number) {
  const n = angle.length;
  if (theta <= angle[0]!) return { t: timeS[0]!, theta: angle[0]!, i: 0 };
  if (theta >= angle[n - 1]!) return { t: timeS[n - 1]!, theta: angle[n - 1]!, i: n - 2 };
  const i = indexAtAngle(angle, theta, hint);
  const span = angle[i + 1]! - angle[i]!;
  const u = span > 0 ? (theta - angle[i]!) / span : 0;
  return { t: timeS[i]! + u * (timeS[i + 1]! - timeS[i]!), theta, i };
}

/**
 * Fast spans of one stretch of log (no gap inside): `timeS` s, `angleRad` the crank angle
 * (integrateAngle), R the fixed block's revolutions, `idleRpm` the idle speed (800 when unknown).
 */
export function findFastSpans(args: {
  timeS: Float64Array;
  angleRad: Float64Array;
  revsPerBlock: number;
  idleRpm: number | null;
}): FastSpan[] {
  const { timeS, angleRad } = args;
  const n = timeS.length;
  if (n < 4) return [];
  const halfRad = Math.PI * args.revsPerBlock;
  const t0 = timeS[0]!;
  const frames = Math.max(1, Math.floor((timeS[n - 1]! - t0) / FRAME_S));
  const rpm = new Float64Array(frames);
  const fast = new Uint8Array(frames);
  const at = new Int32Array(frames + 1);
  const frameRpm = frameMeans(timeS, args.angleRad, frames, FRAME_S);
  let i = 0;
  let hintA = 0;
  let hintB = 0;
  for (let f = 0; f < frames; f++) {
    const t = t0 + (f + 0.5) * FRAME_S;
    while (i < n - 2 && timeS[i + 1]! <= t) i++;
    at[f] = i;
    const th = angleRad[i]!;
    const a = timeAtAngle(angleRad, timeS, th - halfRad, hintA);
    const b = timeAtAngle(angleRad, timeS, th + halfRad, hintB);
    hintA = a.i;
    hintB = b.i;
    const toRpm = (dTheta: number, dt: number) => (dt > 0 ? (dTheta / dt) * RPM_PER_RAD_S : NaN);
    let n1 = toRpm(th - a.theta, timeS[i]! - a.t);
    let n2 = toRpm(b.theta - th, b.t - timeS[i]!);
    if (Number.isNaN(n1)) n1 = n2;
    if (Number.isNaN(n2)) n2 = n1;
    const mean = toRpm(b.theta - a.theta, b.t - a.t);
    rpm[f] = Number.isFinite(mean) ? mean : 0;
    fast[f] =
      frameRpm[f]! >= STANDSTILL_RPM && 2 * Math.abs(n2 - n1) > MAX_SPEED_CHANGE_PER_BLOCK * rpm[f]!
        ? 1
        : 0;
  }
  at[frames] = n;
  return spansFromFrames({ rpm, fast, at, n, timeAt: (k) => timeS[k]!, idleRpm: args.idleRpm });
}

/**
 * The spans of findFastSpans from its frames: block-mean speed `rpm` and the fast mark of each
 * FAST_FRAME_S frame, `at` the sample at each frame's middle (at[frames] = n), `timeAt` the time
 * of a sample (only the spans' first and last are asked for).
 */
export function spansFromFrames(args: {
  rpm: Float64Array;
  fast: Uint8Array;
  at: Int32Array;
  n: number;
  timeAt: (index: number) => number;
  idleRpm: number | null;
}): FastSpan[] {
  const { rpm, fast, at, n } = args;
  const frames = rpm.length;
  // Runs of fast frames, joined across short gaps.
  const runs: [number, number][] = [];
  const gap = Math.round(MERGE_GAP_S / FRAME_S);
  for (let f = 0; f < frames; f++) {
    if (!fast[f]) continue;
    let g = f;
    while (g < frames && fast[g]) g++;
    const last = runs[runs.length - 1];
    if (last && f - last[1] <= gap) last[1] = g;
    else runs.push([f, g]);
    f = g;
  }
  const idle = args.idleRpm ?? 800;
  return runs.map(([a, b]) => {
    const startIndex = a === 0 ? 0 : at[a]!;
    const endIndex = b >= frames ? n : at[b]! + 1;
    return {
      kind: spanKind(rpm, a, b, idle),
      startIndex,
      endIndex,
      startS: args.timeAt(startIndex),
      endS: args.timeAt(endIndex - 1),
    };
  });
}

/** Mean crank speed of each frame from the angle it turns, rpm (standstill: 0). */
function frameMeans(timeS: Float64Array, angleRad: Float64Array, frames: number, frameS: number) {
  const out = new Float64Array(frames);
  const n = timeS.length;
  let i = 0;
  for (let f = 0; f < frames; f++) {
    const start = i;
    const end = timeS[0]! + (f + 1) * frameS;
    while (i < n - 1 && timeS[i + 1]! <= end) i++;
    const dt = timeS[i]! - timeS[start]!;
    out[f] = dt > 0 ? ((angleRad[i]! - angleRad[start]!) / dt) * RPM_PER_RAD_S : 0;
  }
  return out;
}

/** Start, stop or fast (rule at the top) for frames [a, b) of block-mean speeds `rpm`. */
function spanKind(rpm: Float64Array, a: number, b: number, idle: number): SpanKind {
  const running = 0.6 * idle;
  const cranking = 0.4 * idle;
  const limit = Math.round(CROSSING_S / FRAME_S);
  const first = rpm[a]!;
  const last = rpm[b - 1]!;
  const crossing = (from: (v: number) => boolean, to: (v: number) => boolean) => {
    let lastFrom = -1;
    for (let f = a; f < b; f++) {
      if (from(rpm[f]!)) lastFrom = f;
      else if (to(rpm[f]!) && lastFrom >= 0 && f - lastFrom <= limit) return true;
    }
    return false;
  };
  if (
    first < cranking &&
    last >= running &&
    crossing(
      (v) => v < cranking,
      (v) => v >= running,
    )
  )
    return "start";
  if (
    first >= running &&
    last < cranking &&
    crossing(
      (v) => v >= running,
      (v) => v < cranking,
    )
  )
    return "stop";
  return "fast";
}
