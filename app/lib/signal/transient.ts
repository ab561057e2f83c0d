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
import { butterworthLowpass4, filtfilt } from "./lowpass.ts";
import {
  passbandGain,
  voldKalmanLowpass,
  voldKalmanOrder,
  weightSquaredForBandwidth,
} from "./vold-kalman.ts";

/** Largest speed change within one fixed block (fraction of the speed) before a span is fast. */
export const MAX_SPEED_CHANGE_PER_BLOCK = 0.05;
/** slewThresholdRpmS in the result is the slew limit at this engine speed, rpm. */
export const SLEW_REFERENCE_RPM = 1000;
/** The order filter's settings for fast spans (vold-kalman.ts). */
export const TRANSIENT_FILTER = {
  poles: 2 as const,
  /** Half-power bandwidth, one side, in orders: 0.2 keeps order q ± 0.5 25 dB down (Tůma 2005, eq. 8). */
  bandwidthOrders: 0.2,
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
const FRAME_S = 0.05;
/** The filter's output is kept at about this rate (at least 10× its widest bandwidth in use), Hz. */
const MEASURE_RATE_HZ = 500;
/** The filter runs at no less than this many times the order's highest frequency in a span. */
const DECIMATE_RATIO = 10;
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
      startS: timeS[startIndex]!,
      endS: timeS[endIndex - 1]!,
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

/** The firing order measured by the filter over one span, sample by sample (rad/s, rpm). */
export interface SpanMeasure {
  span: FastSpan;
  /** Stored every `stride`-th sample of the span (the envelopes are smooth far below fs). */
  stride: number;
  /** Crank speed of each sample's slow trend, rpm. */
  rpm: Float64Array;
  /** Complex 0-peak firing-order amplitudes, rad/s, same phase reference on both channels. */
  cRe: Float64Array;
  cIm: Float64Array;
  gRe: Float64Array;
  gIm: Float64Array;
  /** Gearbox noise in the filter's band as a 0-peak amplitude, rad/s. */
  noiseRadS: Float64Array;
  /**
   * 0 resolved; 1 order frequency within RESOLVE_RATIO bandwidths; 2 the filter's ends; 3 the
   * speed changes by more than MAX_CHANGE_PER_FIRING within one period of the order.
   */
  unresolved: Uint8Array;
}

/** Two-sided equivalent noise bandwidth of the filter in units of its half-power bandwidth. */
function enbwFactor(poles: number): number {
  // ∫|H(f)|² df over ±∞ with |H| = 1/(1 + (√2−1)·(f/f3)^(2p)) (small-offset form of Tůma eq. 8).
  let s = 0;
  const du = 0.001;
  for (let u = du / 2; u < 20; u += du)
    s += (1 / (1 + (Math.SQRT2 - 1) * u ** (2 * poles))) ** 2 * du;
  return 2 * s;
}
const ENBW = enbwFactor(TRANSIENT_FILTER.poles);

/**
 * Measures the firing order over `span` of one stretch of log (arrays of the stretch; `angleRad`
 * its crank angle). The filter runs over the span widened by a margin (2 periods of the trend's
 * bandwidth, at most 3 s) so only the stretch's own ends are the filter's ends. Each channel's slow trend
 * (the smoother at 0.1 × q orders) is removed first, then the order is extracted at
 * TRANSIENT_FILTER's bandwidth. The gearbox noise is what remains of the gearbox signal after the
 * trend and the extracted order, spread evenly up to fs/2 and taken through the filter's band.
 */
export function measureSpan(args: {
  timeS: Float64Array;
  angleRad: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  sampleRateHz: number;
  order: number;
  span: FastSpan;
}): SpanMeasure {
  const { timeS, angleRad, crankRadS, gearboxRadS, sampleRateHz: fs, order: q, span } = args;
  const n = timeS.length;
  const bwAt = (radS: number) =>
    Math.max(
      TRANSIENT_FILTER.minBandwidthHz,
      (TRANSIENT_FILTER.bandwidthOrders * Math.abs(radS)) / (2 * Math.PI),
    );
  // Two periods of the (narrower) trend bandwidth: the smoother's memory has died out by then.
  const trendBw = (radS: number) =>
    Math.max(TRANSIENT_FILTER.minBandwidthHz, (0.1 * q * Math.abs(radS)) / (2 * Math.PI));
  const margin = (i: number) => Math.ceil(fs * Math.min(3, 2 / trendBw(crankRadS[i]!)));
  const aWanted = Math.max(0, span.startIndex - margin(span.startIndex));
  const b = Math.min(n, span.endIndex + margin(Math.max(span.startIndex, span.endIndex - 1)));
  // Decimation by D (anti-alias: zero-phase 4th-order Butterworth at 0.4 × the new rate) so the
  // new rate is at least DECIMATE_RATIO × the order's highest frequency in the range: the
  // filter's cost then follows the order, not the logger's rate.
  let top = 0;
  for (let i = aWanted; i < b; i++) top = Math.max(top, Math.abs(crankRadS[i]!));
  const topOrderHz = Math.max(1, (q * top) / (2 * Math.PI));
  const D = Math.max(1, Math.floor(fs / (DECIMATE_RATIO * topOrderHz)));
  const a = span.startIndex - D * Math.floor((span.startIndex - aWanted) / D);
  const fsd = fs / D;
  const lp = D > 1 ? butterworthLowpass4((0.4 * fs) / D, fs) : [];
  const pick = (x: Float64Array, filter: boolean) => {
    const y = filter && lp.length ? filtfilt(x.subarray(a, b), lp) : x.subarray(a, b);
    if (D === 1) return y;
    const out = new Float64Array(Math.ceil((b - a) / D));
    for (let k = 0; k < out.length; k++) out[k] = y[k * D]!;
    return out;
  };
  const c = pick(crankRadS, true);
  const g = pick(gearboxRadS, true);
  const th = pick(angleRad, false);
  const trendOpts = {
    bandwidthOrders: 0.1 * q,
    minBandwidthHz: TRANSIENT_FILTER.minBandwidthHz,
    poles: TRANSIENT_FILTER.poles,
  };
  const cTrend = voldKalmanLowpass({
    signal: c,
    shaftRadS: c,
    sampleRateHz: fsd,
    options: trendOpts,
  });
  const gTrend = voldKalmanLowpass({
    signal: g,
    shaftRadS: c,
    sampleRateHz: fsd,
    options: trendOpts,
  });
  const cRes = new Float64Array(c.length);
  const gRes = new Float64Array(c.length);
  for (let k = 0; k < c.length; k++) {
    cRes[k] = c[k]! - cTrend[k]!;
    gRes[k] = g[k]! - gTrend[k]!;
  }
  const orderArgs = {
    angleRad: th,
    shaftRadS: cTrend,
    order: q,
    sampleRateHz: fsd,
    options: TRANSIENT_FILTER,
  };
  const ce = voldKalmanOrder({ signal: cRes, ...orderArgs });
  const ge = voldKalmanOrder({ signal: gRes, ...orderArgs });
  const strideD = Math.max(1, Math.floor(fsd / MEASURE_RATE_HZ));
  const stride = strideD * D;
  const len = Math.ceil((span.endIndex - span.startIndex) / stride);
  const out: SpanMeasure = {
    span,
    stride,
    rpm: new Float64Array(len),
    cRe: new Float64Array(len),
    cIm: new Float64Array(len),
    gRe: new Float64Array(len),
    gIm: new Float64Array(len),
    noiseRadS: new Float64Array(len),
    unresolved: new Uint8Array(len),
  };
  const tFirst = timeS[0]!;
  const tLast = timeS[n - 1]!;
  for (let j = 0; j < len; j++) {
    const k = (span.startIndex - a) / D + j * strideD;
    const w = cTrend[k]!;
    const bw = bwAt(w);
    out.rpm[j] = w * RPM_PER_RAD_S;
    // 0-peak complex amplitude is 2x (vold-kalman.ts).
    out.cRe[j] = 2 * ce.re[k]!;
    out.cIm[j] = 2 * ce.im[k]!;
    out.gRe[j] = 2 * ge.re[k]!;
    out.gIm[j] = 2 * ge.im[k]!;
    const t = timeS[span.startIndex + j * stride]!;
    const orderHz = (q * Math.abs(w)) / (2 * Math.PI);
    const k0 = Math.max(0, k - 1);
    const k1 = Math.min(c.length - 1, k + 1);
    const slew = Math.abs(cTrend[k1]! - cTrend[k0]!) * (fsd / Math.max(1, k1 - k0));
    if (orderHz < RESOLVE_RATIO * bw) out.unresolved[j] = 1;
    else if (slew > MAX_CHANGE_PER_FIRING * Math.abs(w) * orderHz) out.unresolved[j] = 3;
    else if (t - tFirst < 1 / bw || tLast - t < 1 / bw) out.unresolved[j] = 2;
  }
  // The gearbox residual after the trend and the order (x = (A/2)e^{jφ}: y ≈ 2Re(x·e^{jqθ})),
  // over the resolved samples; the median of r² / 0.455 (the median of χ²₁) is σ² for Gaussian
  // noise and is not pulled up by the few samples where the trend lags (standstill, a kink).
  const r2: number[] = [];
  for (let j = 0; j < len; j += 1 + (len >> 15)) {
    if (out.unresolved[j]) continue;
    const k = (span.startIndex - a) / D + j * strideD;
    const ph = q * th[k]!;
    const r = gRes[k]! - 2 * (ge.re[k]! * Math.cos(ph) - ge.im[k]! * Math.sin(ph));
    r2.push(r * r);
  }
  r2.sort((x, y) => x - y);
  const sigma = Math.sqrt((r2[r2.length >> 1] ?? 0) / 0.455);
  for (let j = 0; j < len; j++) {
    const bw = bwAt(out.rpm[j]! / RPM_PER_RAD_S);
    out.noiseRadS[j] = 2 * sigma * Math.sqrt((ENBW * bw) / fsd);
  }
  return out;
}

/** |H| of the order filter at `offsetOrders` from the order line at shaft speed `rpm` (for docs and tests). */
export function filterGainAt(offsetOrders: number, rpm: number, sampleRateHz: number): number {
  const shaftHz = rpm / 60;
  const bw = Math.max(TRANSIENT_FILTER.minBandwidthHz, TRANSIENT_FILTER.bandwidthOrders * shaftHz);
  const w2 = weightSquaredForBandwidth(bw, sampleRateHz, TRANSIENT_FILTER.poles);
  return passbandGain(offsetOrders * shaftHz, w2, sampleRateHz, TRANSIENT_FILTER.poles);
}
