/**
 * Vold–Kalman order filter, second generation (Vold & Leuridan, SAE 931288, 1993; Vold, Mains &
 * Blough, SAE 972007, 1997; J. Tůma, "Setting the passband width in the Vold–Kalman order
 * tracking filter", ICSV12, 2005).
 *
 * The measured signal y(t) is modelled as one order's complex envelope x(t) riding on the order's
 * phase: y_i = x_i·e^{jθ_i} + (its conjugate) + ε_i, θ_i = order · crank angle. The envelope is
 * smooth: its p-th difference (the structural equation, p "poles") is small, ∇^p x_i = η_i.
 * The least-squares solution of both equations, with weight r_i on the structural one,
 *
 *     (I + Aᵀ W A) x = e^{−jθ} ⊙ y,   W = diag(r_i²),  A the p-th difference matrix,
 *
 * is a zero-phase low-pass of the demodulated signal: a symmetric positive-definite band matrix
 * of half-width p, solved here as the least-squares problem it came from (Givens rotations,
 * O(n·p²); banded-least-squares.ts says why not Cholesky). Only the order's own term is
 * modelled (the conjugate at −2·f lies far outside the passband), so a real tone
 * A·cos(θ + φ) reads x = (A/2)·e^{jφ}: 0-peak amplitude 2|x|, phase arg x.
 *
 * Passband (Tůma 2005; equation number from memory): a component Δf from the order's frequency passes with
 *     |H(Δf)| = 1 / (1 + r² · (2 − 2·cos(2πΔf/fs))^p),
 * so the half-power (−3 dB) bandwidth Δf₃ (one side of the order line) sets
 *     r² = (√2 − 1) / (2 − 2·cos(2πΔf₃/fs))^p.
 * Here Δf₃ follows the shaft: `bandwidthOrders` · shaft rate (a constant bandwidth in orders, so
 * a start through 200 rpm and a pull to 6000 rpm keep the same order selectivity), never below
 * `minBandwidthHz`; or a fixed `bandwidthHz`. The weight is set per structural row.
 *
 * The filter removes nothing but what lies outside its passband: a speed channel's mean (order
 * 0) sits `order` orders away and is rejected by |H| there, but a large mean against a small
 * fluctuation leaks (over 50 % in a run-up); callers remove the slow trend first
 * (`voldKalmanLowpass` with θ = 0 is that trend; `voldKalmanSpeedOrders` does both). The first
 * and last stretch are the filter's ends (no data beyond them): trust the envelope from 1/Δf₃
 * inwards (1 % reached 0.2/Δf₃ in the run-up test). Defaults, limits and measured accuracy:
 * docs/order-filter.md.
 */
import { factorBanded, solveFactored } from "./banded-least-squares.ts";

export interface VoldKalmanOptions {
  /** Half-power bandwidth, one side of the order line, in orders (× shaft rate). Default 0.2. */
  bandwidthOrders?: number;
  /** A fixed half-power bandwidth in Hz instead (overrides bandwidthOrders). */
  bandwidthHz?: number;
  /** Least bandwidth when the shaft is slow or stands still, Hz. Default 0.3. */
  minBandwidthHz?: number;
  /** Poles of the structural equation (order of the difference), 1–3. Default 2. */
  poles?: 1 | 2 | 3;
}

export const VOLD_KALMAN_DEFAULTS = {
  bandwidthOrders: 0.2,
  minBandwidthHz: 0.3,
  poles: 2,
} as const;

/**
 * Options for start and stop events: 0.3 orders follows a damper resonance crossed at ~220 rpm/s
 * (ζ = 0.1) within 0.5 dB where the default 0.2 orders smooths its peak by 1.1 dB; the price is
 * selectivity, a neighbour 0.5 orders away passes at −12 dB instead of −25 dB (docs/order-filter.md).
 */
export const VOLD_KALMAN_EVENT_OPTIONS: VoldKalmanOptions = { bandwidthOrders: 0.3 };

/** The order's complex envelope per sample: x = re + j·im, 0-peak amplitude 2|x|, phase arg x. */
export interface OrderEnvelope {
  re: Float64Array;
  im: Float64Array;
  /** 0-peak amplitude of the order at each sample, in the unit of the signal. */
  amplitude: Float64Array;
}

/**
 * |1 − e^{−jω}|² = 2 − 2·cos ω at ω = 2πf/fs, written 4·sin²(ω/2): the same value without the
 * cancellation of 2 − 2·cos ω near 1 (relative error 1e-6 at 0.1 Hz and 50 kHz otherwise).
 */
function differenceGain(hz: number, sampleRateHz: number): number {
  const s = Math.sin((Math.PI * hz) / sampleRateHz);
  return 4 * s * s;
}

/** Structural-equation weight r² for a half-power bandwidth `bandwidthHz` (Tůma 2005, eq. 8). */
export function weightSquaredForBandwidth(
  bandwidthHz: number,
  sampleRateHz: number,
  poles: number,
): number {
  return (Math.SQRT2 - 1) / differenceGain(bandwidthHz, sampleRateHz) ** poles;
}

/** |H| of the filter for a component `offsetHz` from the order line, at weight r². */
export function passbandGain(
  offsetHz: number,
  weightSquared: number,
  sampleRateHz: number,
  poles: number,
): number {
  return 1 / (1 + weightSquared * differenceGain(offsetHz, sampleRateHz) ** poles);
}

/** Per-row weights r² from the options and the shaft rate (rad/s) at each sample. */
function rowWeights(
  shaftRadS: Float64Array,
  sampleRateHz: number,
  o: Required<Pick<VoldKalmanOptions, "bandwidthOrders" | "minBandwidthHz" | "poles">> &
    Pick<VoldKalmanOptions, "bandwidthHz">,
): Float64Array {
  const n = shaftRadS.length;
  const p = o.poles;
  const w2 = new Float64Array(Math.max(0, n - p));
  const fixed =
    o.bandwidthHz !== undefined ? weightSquaredForBandwidth(o.bandwidthHz, sampleRateHz, p) : 0;
  for (let k = 0; k < w2.length; k++) {
    if (o.bandwidthHz !== undefined) {
      w2[k] = fixed;
      continue;
    }
    // The stencil's middle sample sets the row's bandwidth.
    const shaftHz = Math.abs(shaftRadS[k + (p >> 1)]!) / (2 * Math.PI);
    const bw = Math.max(o.minBandwidthHz, o.bandwidthOrders * shaftHz);
    w2[k] = weightSquaredForBandwidth(Math.min(bw, 0.45 * sampleRateHz), sampleRateHz, p);
  }
  return w2;
}

function resolve(options: VoldKalmanOptions) {
  const o = {
    bandwidthOrders: options.bandwidthOrders ?? VOLD_KALMAN_DEFAULTS.bandwidthOrders,
    minBandwidthHz: options.minBandwidthHz ?? VOLD_KALMAN_DEFAULTS.minBandwidthHz,
    poles: options.poles ?? VOLD_KALMAN_DEFAULTS.poles,
    bandwidthHz: options.bandwidthHz,
  };
  if (![1, 2, 3].includes(o.poles)) throw new RangeError("poles must be 1, 2 or 3");
  if (!(o.bandwidthOrders > 0) || !(o.minBandwidthHz > 0))
    throw new RangeError("the bandwidth must be positive");
  if (o.bandwidthHz !== undefined && !(o.bandwidthHz > 0))
    throw new RangeError("the bandwidth must be positive");
  return o;
}

/**
 * One order's envelope from `signal` (any unit; speeds in rad/s here). `angleRad` is the crank
 * angle at each sample (rad, from `integrateAngle`), `shaftRadS` the crank speed that sets the
 * bandwidth (rad/s), `order` in orders per crank revolution. Arrays of one length, uniform
 * sampling at `sampleRateHz`. Throws RangeError on bad options (callers validate first).
 */
export function voldKalmanOrder(args: {
  signal: Float64Array;
  angleRad: Float64Array;
  shaftRadS: Float64Array;
  order: number;
  sampleRateHz: number;
  options?: VoldKalmanOptions;
}): OrderEnvelope {
  const o = resolve(args.options ?? {});
  const R = factorFor(args.shaftRadS, args.sampleRateHz, o, args.signal.length);
  return envelope(R, o.poles, args.signal, args.angleRad, args.order);
}

/**
 * The last factor and the weights it was made from: callers filter two channels with the same
 * shaft speed one after the other (span-measure.ts: the trends, then the order of each), and the
 * factorisation is most of a filter's cost. Reused only when the weights are equal value for
 * value, so the result is the same as a fresh factorisation.
 */
let lastFactor: { w2: Float64Array; p: number; n: number; R: Float64Array } | undefined;

function sameWeights(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let k = 0; k < a.length; k++) if (a[k] !== b[k]) return false;
  return true;
}

/** The factor for these weights, or null when there are too few samples for one equation. */
function factorFor(
  shaftRadS: Float64Array,
  sampleRateHz: number,
  o: ReturnType<typeof resolve>,
  n: number,
): Float64Array | null {
  if (n <= o.poles) return null;
  const w2 = rowWeights(shaftRadS, sampleRateHz, o);
  const last = lastFactor;
  if (last && last.p === o.poles && last.n === n && sameWeights(last.w2, w2)) return last.R;
  const R = factorBanded(w2, o.poles, n);
  lastFactor = { w2, p: o.poles, n, R };
  return R;
}

function envelope(
  R: Float64Array | null,
  p: number,
  signal: Float64Array,
  angleRad: Float64Array,
  order: number,
): OrderEnvelope {
  const n = signal.length;
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const th = order * angleRad[i]!;
    re[i] = signal[i]! * Math.cos(th);
    im[i] = -signal[i]! * Math.sin(th);
  }
  if (R) {
    solveFactored(R, p, re);
    solveFactored(R, p, im);
  }
  const amplitude = new Float64Array(n);
  // sqrt, not Math.hypot: ten times faster here, and |x| is far from overflow.
  for (let i = 0; i < n; i++) amplitude[i] = 2 * Math.sqrt(re[i]! * re[i]! + im[i]! * im[i]!);
  return { re, im, amplitude };
}

/**
 * One order of several speed channels (crank and gearbox) at once, each with its slow trend
 * (`voldKalmanLowpass`) taken out first, as docs/order-filter.md describes for speed channels.
 * Same arguments as voldKalmanOrder; the channels share the crank angle and the weights, so one
 * factorisation serves the trends and the envelopes (about 2.5× faster than four separate calls).
 */
export function voldKalmanSpeedOrders(args: {
  channels: readonly Float64Array[];
  angleRad: Float64Array;
  shaftRadS: Float64Array;
  order: number;
  sampleRateHz: number;
  options?: VoldKalmanOptions;
}): OrderEnvelope[] {
  const o = resolve(args.options ?? {});
  const n = args.angleRad.length;
  const R = factorFor(args.shaftRadS, args.sampleRateHz, o, n);
  return args.channels.map((signal) => {
    const trend = Float64Array.from(signal);
    if (R) solveFactored(R, o.poles, trend);
    for (let i = 0; i < n; i++) trend[i] = signal[i]! - trend[i]!;
    return envelope(R, o.poles, trend, args.angleRad, args.order);
  });
}

/**
 * The same smoother without demodulation: a zero-phase low-pass of `signal` whose half-power
 * frequency follows the shaft like the order filter's bandwidth (θ = 0). Used to take a speed
 * channel's slow trend (its mean speed) out before an order is extracted.
 */
export function voldKalmanLowpass(args: {
  signal: Float64Array;
  shaftRadS: Float64Array;
  sampleRateHz: number;
  options?: VoldKalmanOptions;
}): Float64Array {
  const o = resolve(args.options ?? {});
  const out = Float64Array.from(args.signal);
  const R = factorFor(args.shaftRadS, args.sampleRateHz, o, out.length);
  if (R) solveFactored(R, o.poles, out);
  return out;
}
