/**
 * Time traces for display, decimated so a long drive log still draws quickly: the speed trace
 * (bucket means of crank and gearbox-input speed) and the rattle check's angular-acceleration
 * envelope (bucket maxima of |α(t)|, so no peak above the limit is hidden by decimation).
 * The full-resolution data stays in the raw drive log, which is kept for download.
 */
import { RPM_PER_RAD_S } from "./firing-order.ts";
import { round } from "./order-curves.ts";

/** At most this many points per trace. */
export const TRACE_POINTS = 1500;

export interface SpeedTrace {
  /** Bucket mid times, s. */
  timeS: number[];
  /** Bucket mean speeds, rpm; null at a point that separates two sections (section-analysis.ts). */
  crankRpm: (number | null)[];
  gearboxRpm: (number | null)[];
  /** Samples averaged into one point (1 when the log is short enough to keep every sample). */
  samplesPerPoint: number;
}

/**
 * Equal-count buckets of consecutive samples; each point is the bucket's mean time and mean
 * speed (rad/s in, rpm out).
 */
export function speedTrace(
  timeS: Float64Array,
  crankRadS: Float64Array,
  gearboxRadS: Float64Array,
  maxPoints = TRACE_POINTS,
): SpeedTrace {
  const n = timeS.length;
  const per = Math.max(1, Math.ceil(n / maxPoints));
  const out: SpeedTrace = { timeS: [], crankRpm: [], gearboxRpm: [], samplesPerPoint: per };
  for (let start = 0; start < n; start += per) {
    const end = Math.min(n, start + per);
    let t = 0;
    let c = 0;
    let g = 0;
    for (let i = start; i < end; i++) {
      t += timeS[i]!;
      c += crankRadS[i]!;
      g += gearboxRadS[i]!;
    }
    const k = end - start;
    out.timeS.push(round(t / k, 3));
    out.crankRpm.push(round((c / k) * RPM_PER_RAD_S, 1));
    out.gearboxRpm.push(round((g / k) * RPM_PER_RAD_S, 1));
  }
  return out;
}

/** Max-preserving decimation of one stretch (t, |α|) to `points` buckets. */
export function envelopeMax(
  t: ArrayLike<number>,
  value: ArrayLike<number>,
  points: number,
): { timeS: number[]; value: number[] } {
  const n = t.length;
  const per = Math.max(1, Math.ceil(n / Math.max(1, points)));
  const timeS: number[] = [];
  const out: number[] = [];
  for (let start = 0; start < n; start += per) {
    const end = Math.min(n, start + per);
    let best = start;
    for (let i = start + 1; i < end; i++) if (value[i]! > value[best]!) best = i;
    timeS.push(round(t[best]!, 3));
    out.push(round(value[best]!, 1));
  }
  return { timeS, value: out };
}
