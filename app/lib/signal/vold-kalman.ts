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
 * O(n·p²); see `solveBanded` for why not Cholesky). Only the order's own term is
 * modelled (the conjugate at −2·f lies far outside the passband), so a real tone
 * A·cos(θ + φ) reads x = (A/2)·e^{jφ}: 0-peak amplitude 2|x|, phase arg x.
 *
 * Passband (Tůma 2005, eq. 8): a component Δf from the order's frequency passes with
 *     |H(Δf)| = 1 / (1 + r² · (2 − 2·cos(2πΔf/fs))^p),
 * so the half-power (−3 dB) bandwidth Δf₃ (one side of the order line) sets
 *     r² = (√2 − 1) / (2 − 2·cos(2πΔf₃/fs))^p.
 * Here Δf₃ follows the shaft: `bandwidthOrders` · shaft rate (a constant bandwidth in orders, so
 * a start through 200 rpm and a pull to 6000 rpm keep the same order selectivity), never below
 * `minBandwidthHz`; or a fixed `bandwidthHz`. The weight is set per structural row.
 *
 * The filter removes nothing but what lies outside its passband: a speed channel's mean (order
 * 0) sits `order` orders away and is rejected by |H| there, but a large mean against a small
 * fluctuation leaks; callers remove the slow trend first (`voldKalmanLowpass` with θ = 0 is that
 * trend). The first and last ~1/Δf₃ seconds are the filter's ends (no data beyond them).
 */

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

/** Alternating binomial coefficients: the p-th difference stencil. */
function stencil(p: number): number[] {
  return p === 1 ? [1, -1] : p === 2 ? [1, -2, 1] : [1, -3, 3, -1];
}

/**
 * The banded upper-triangular factor R of I + AᵀWA = RᵀR (half-width p, row j holds R[j][j…j+p]
 * at j·(p+1)), computed as the QR factor of the least-squares matrix [I; √W·A] by Givens
 * rotations, row by row: O(n·p²). Why not Cholesky of I + AᵀWA: forming that matrix adds 1 to
 * entries of about 6·r², so at r² ≳ 1e12 (0.3 Hz at 5 kHz) the identity is lost to rounding and
 * the envelope came out 1 % (r² = 2e13) to 100 % (r² = 1e15) wrong; the rotations work on √W·A
 * (entries ~r) and keep 1e-8 at r² = 1e19 (docs/order-filter.md). `w2[k]` is the weight r² of
 * structural row k (k = 0 … n−p−1). One factor serves every right-hand side with these weights.
 */
function factorBanded(w2: Float64Array, p: number, n: number): Float64Array {
  if (p === 2) return factorBanded2(w2, n);
  const c = stencil(p);
  const wd = p + 1;
  const R = new Float64Array(n * wd);
  const v = new Float64Array(wd);
  let filled = 0;
  for (let k = 0; k < n; k++) {
    for (let row = 0; row < 2; row++) {
      if (row === 0) {
        v.fill(0);
        v[0] = 1; // the data equation of sample k
      } else {
        if (k + p >= n) break;
        const r = Math.sqrt(w2[k]!); // structural equation k, weighted
        for (let m = 0; m <= p; m++) v[m] = r * c[m]!;
      }
      const last = Math.min(k + p, n - 1);
      for (let j = k; j <= last; j++) {
        const at = j * wd;
        if (j >= filled) {
          for (let m = 0; m <= p; m++) R[at + m] = v[m]!;
          filled = j + 1;
          break;
        }
        const a = R[at]!;
        const b = v[0]!;
        if (b !== 0) {
          const h = Math.sqrt(a * a + b * b);
          const cs = a / h;
          const sn = b / h;
          R[at] = h;
          for (let m = 1; m <= p; m++) {
            const rj = R[at + m]!;
            const vm = v[m]!;
            R[at + m] = cs * rj + sn * vm;
            v[m - 1] = cs * vm - sn * rj;
          }
        } else for (let m = 1; m <= p; m++) v[m - 1] = v[m]!;
        v[p] = 0;
      }
    }
  }
  return R;
}

/** factorBanded for p = 2 (the default) with the row in locals: the same rotations, 3× faster. */
function factorBanded2(w2: Float64Array, n: number): Float64Array {
  const R = new Float64Array(n * 3);
  let filled = 0;
  for (let k = 0; k < n; k++) {
    for (let row = 0; row < 2; row++) {
      let v0 = 1;
      let v1 = 0;
      let v2 = 0;
      if (row === 1) {
        if (k + 2 >= n) break;
        const r = Math.sqrt(w2[k]!);
        v0 = r;
        v1 = -2 * r;
        v2 = r;
      }
      const last = Math.min(k + 2, n - 1);
      for (let j = k; j <= last; j++) {
        const at = j * 3;
        if (j >= filled) {
          R[at] = v0;
          R[at + 1] = v1;
          R[at + 2] = v2;
          filled = j + 1;
          break;
        }
        if (v0 !== 0) {
          const a = R[at]!;
          const h = Math.sqrt(a * a + v0 * v0);
          const cs = a / h;
          const sn = v0 / h;
          const r1 = R[at + 1]!;
          const r2 = R[at + 2]!;
          R[at] = h;
          R[at + 1] = cs * r1 + sn * v1;
          R[at + 2] = cs * r2 + sn * v2;
          v0 = cs * v1 - sn * r1;
          v1 = cs * v2 - sn * r2;
        } else {
          v0 = v1;
          v1 = v2;
        }
        v2 = 0;
      }
    }
  }
  return R;
}

/** Solves RᵀR·x = b in place (forward then back substitution with the factor R). */
function solveFactored(R: Float64Array, p: number, b: Float64Array): void {
  const n = b.length;
  const wd = p + 1;
  for (let i = 0; i < n; i++) {
    let s = b[i]!;
    for (let m = 1; m <= p && m <= i; m++) s -= R[(i - m) * wd + m]! * b[i - m]!;
    b[i] = s / R[i * wd]!;
  }
  for (let j = n - 1; j >= 0; j--) {
    const at = j * wd;
    let s = b[j]!;
    for (let m = 1; m <= p && j + m < n; m++) s -= R[at + m]! * b[j + m]!;
    b[j] = s / R[at]!;
  }
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

/** The factor for these weights, or null when there are too few samples for one equation. */
function factorFor(
  shaftRadS: Float64Array,
  sampleRateHz: number,
  o: ReturnType<typeof resolve>,
  n: number,
): Float64Array | null {
  return n > o.poles ? factorBanded(rowWeights(shaftRadS, sampleRateHz, o), o.poles, n) : null;
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
