/**
 * Bringing a channel recorded on another time base onto the crank channel's: linear
 * interpolation between the two neighbouring samples (docs/mdf4.md says what that does to the
 * spectrum). Times in s, strictly increasing on both sides.
 */

/** Indices [from, to) of `t` that lie within [lo, hi]. */
export function within(t: Float64Array, lo: number, hi: number): { from: number; to: number } {
  let from = 0;
  while (from < t.length && t[from]! < lo) from++;
  let to = t.length;
  while (to > from && t[to - 1]! > hi) to--;
  return { from, to };
}

/** The values v(tIn) at the times tOut[from..to), by linear interpolation (tOut within tIn). */
export function interpolateOnto(
  tOut: Float64Array,
  from: number,
  to: number,
  tIn: Float64Array,
  vIn: Float64Array,
): Float64Array {
  const out = new Float64Array(to - from);
  let j = 0;
  const last = tIn.length - 1;
  for (let i = from; i < to; i++) {
    const t = tOut[i]!;
    while (j < last - 1 && tIn[j + 1]! <= t) j++;
    const t0 = tIn[j]!;
    const t1 = tIn[j + 1] ?? t0;
    const v0 = vIn[j]!;
    if (t1 === t0 || t <= t0) out[i - from] = v0;
    else if (t >= t1) out[i - from] = vIn[j + 1]!;
    else out[i - from] = v0 + ((vIn[j + 1]! - v0) * (t - t0)) / (t1 - t0);
  }
  return out;
}

/** Index of the first sample that does not increase on the one before, or −1. */
export function firstNotIncreasing(t: Float64Array): number {
  for (let i = 1; i < t.length; i++) if (!(t[i]! > t[i - 1]!)) return i;
  return -1;
}

/** Samples of a channel as they arrive, in a Float64Array grown by doubling. */
export class Samples {
  data: Float64Array;
  length = 0;
  constructor(capacity: number) {
    this.data = new Float64Array(Math.max(16, capacity));
  }
  /** Appends values[0..n). */
  append = (values: Float64Array, n: number): void => {
    if (this.length + n > this.data.length) {
      const next = new Float64Array(Math.max(this.data.length * 2, this.length + n));
      next.set(this.data.subarray(0, this.length));
      this.data = next;
    }
    this.data.set(values.subarray(0, n), this.length);
    this.length += n;
  };
  take(): Float64Array {
    return this.length === this.data.length ? this.data : this.data.slice(0, this.length);
  }
}
