/**
 * Twist between the damper's primary (crank) and secondary (gearbox input) side.
 *
 * Relative angle: θ_rel(t) = ∫(ω_crank − ω_gearbox) dt (trapezoidal, rad → degrees). Two speed
 * sensors are not an angle sensor: a scale mismatch of 0.05 % between them integrates to a ramp
 * of 0.0005·ω·t (≈ 2.4 °/s at 800 rpm), and the integration constant is unknown. The slow part
 * is removed with a zero-phase high-pass (the Vold–Kalman smoother with θ = 0 at a fixed
 * half-power frequency, `driftCutoffHz`, subtracted), which also removes what a speed pair can
 * never show: the static twist under load (the spring's mean wind-up carrying the torque) and
 * anything slower than the cut-off. What stays is the oscillating twist: the firing-order swing
 * and the resonance swing at start and stop. A travel margin from it is a margin of swing about an
 * unknown mean position (docs/order-filter.md §3): it cannot prove the end stops are clear under load.
 *
 * Firing-order twist amplitude: the order's complex 0-peak speed amplitudes C (crank) and G
 * (gearbox), rad/s, at order frequency f, give the relative angle amplitude |C − G| / (2πf) rad
 * (an angle's amplitude is its speed's amplitude over ω: d/dt e^{jωt} = jω·e^{jωt}).
 */
import { RPM_PER_RAD_S } from "./firing-order.ts";
import type { TrackedBlocks } from "./order-tracking.ts";
import { voldKalmanLowpass } from "./vold-kalman.ts";

/** Default high-pass for the drift of θ_rel, Hz: below the firing frequency of any running engine. */
export const TWIST_DRIFT_CUTOFF_HZ = 0.5;

const DEG_PER_RAD = 180 / Math.PI;

/**
 * θ_rel(t) in degrees, drift removed (see top). `timeS` in s, speeds in rad/s, uniform sampling
 * at `sampleRateHz`.
 */
export function relativeTwistDeg(args: {
  timeS: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  sampleRateHz: number;
  driftCutoffHz?: number;
}): Float64Array {
  const { timeS, crankRadS, gearboxRadS } = args;
  const n = timeS.length;
  const theta = new Float64Array(n);
  for (let i = 1; i < n; i++) {
    const d0 = crankRadS[i - 1]! - gearboxRadS[i - 1]!;
    const d1 = crankRadS[i]! - gearboxRadS[i]!;
    theta[i] = theta[i - 1]! + 0.5 * (d0 + d1) * (timeS[i]! - timeS[i - 1]!);
  }
  const slow = voldKalmanLowpass({
    signal: theta,
    shaftRadS: theta, // unused with a fixed bandwidth
    sampleRateHz: args.sampleRateHz,
    options: { bandwidthHz: args.driftCutoffHz ?? TWIST_DRIFT_CUTOFF_HZ },
  });
  for (let i = 0; i < n; i++) theta[i] = (theta[i]! - slow[i]!) * DEG_PER_RAD;
  return theta;
}

/** max − min of x over samples [from, to). 0 for an empty range. */
export function peakToPeak(x: Float64Array, from: number, to: number): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = Math.max(0, from); i < Math.min(x.length, to); i++) {
    if (x[i]! < lo) lo = x[i]!;
    if (x[i]! > hi) hi = x[i]!;
  }
  return hi >= lo ? hi - lo : 0;
}

/**
 * Twist amplitude (0-peak, degrees) of one order from the complex 0-peak speed amplitudes of both
 * sides (rad/s, same phase reference) at order frequency `orderHz` (> 0).
 */
export function twistAmplitudeDeg(
  crank: { re: number; im: number },
  gearbox: { re: number; im: number },
  orderHz: number,
): number {
  const d = Math.hypot(crank.re - gearbox.re, crank.im - gearbox.im);
  return (d / (2 * Math.PI * orderHz)) * DEG_PER_RAD;
}

export interface TwistPoint {
  rpm: number;
  deg: number;
  blocks: number;
}

/**
 * Firing-order twist amplitude per rpm bin from the tracked blocks' complex spectra at the
 * firing order (power-averaged over the bin's blocks like the order curves). Empty unless the
 * blocks carry the complex difference (TrackedBlocks.twistRadS: trackBlocks with `firingBin`).
 */
export function twistCurve(tracked: TrackedBlocks, order: number, binRpm: number): TwistPoint[] {
  const diff = tracked.twistRadS;
  if (!diff) return [];
  const sums = new Map<number, { s: number; n: number }>();
  for (let b = 0; b < tracked.blockCount; b++) {
    const rpm = tracked.blockRadS[b]! * RPM_PER_RAD_S;
    const bin = Math.round(rpm / binRpm) * binRpm;
    const orderHz = (order * tracked.blockRadS[b]!) / (2 * Math.PI);
    const deg = (diff[b]! / (2 * Math.PI * orderHz)) * DEG_PER_RAD;
    const e = sums.get(bin) ?? { s: 0, n: 0 };
    e.s += deg * deg;
    e.n += 1;
    sums.set(bin, e);
  }
  return [...sums.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([rpm, e]) => ({ rpm, deg: Math.sqrt(e.s / e.n), blocks: e.n }));
}
