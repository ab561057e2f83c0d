/**
 * The firing order measured by the Vold–Kalman order filter over one fast span (transient.ts
 * finds the spans; docs/signal-computation.md, "Transients"): trend removed, order extracted on
 * both channels, each sample marked resolved or not, the gearbox noise in the filter's band.
 * Units: rad/s, rpm, s, Hz.
 */
import { RPM_PER_RAD_S } from "./firing-order.ts";
import { butterworthLowpass4, filtfilt } from "./lowpass.ts";
import {
  MAX_CHANGE_PER_FIRING,
  RESOLVE_RATIO,
  TRANSIENT_FILTER,
  type FastSpan,
} from "./transient.ts";
import {
  passbandGain,
  voldKalmanLowpass,
  voldKalmanOrder,
  weightSquaredForBandwidth,
} from "./vold-kalman.ts";

/** The filter's output is kept at about this rate (at least 10× its widest bandwidth in use), Hz. */
const MEASURE_RATE_HZ = 500;
/** The filter runs at no less than this many times the order's highest frequency in a span. */
const DECIMATE_RATIO = 10;

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
 * its crank angle). The filter runs over the span widened by a margin (2 periods of the
 * trend's bandwidth, at most 3 s) so only the stretch's own ends are the filter's ends, decimated
 * to DECIMATE_RATIO × the order's top frequency. Each channel's slow trend (the smoother at
 * 0.1 × q orders) is removed first, then the order is extracted at TRANSIENT_FILTER's bandwidth. The gearbox noise is what remains of the gearbox signal after the
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
