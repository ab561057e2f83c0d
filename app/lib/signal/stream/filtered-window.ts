/**
 * The zero-phase low-pass (lowpass.ts, filtfilt) of a stretch computed window by window: each
 * window is read with `filterMargin` extra samples on either side, filtered forward and
 * backward, and only its middle kept. The margin is where the start-up of either pass (a
 * steady state at the window's edge instead of the true history) has decayed below 1e-12 of the
 * signal, from the slowest pole of the biquads; at the stretch's own ends no margin is read, so
 * the edge handling is the batch filter's. docs/signal-computation.md, "Bounded-memory analysis".
 */
import { filtfilt, type Biquad } from "../lowpass.ts";

/** Largest pole radius of one biquad (1 − a1·z⁻¹ … : z² + a1·z + a2). */
function poleRadius(s: Biquad): number {
  const disc = s.a1 * s.a1 - 4 * s.a2;
  if (disc < 0) return Math.sqrt(s.a2);
  const r = Math.sqrt(disc);
  return Math.max(Math.abs((-s.a1 + r) / 2), Math.abs((-s.a1 - r) / 2));
}

/** Relative size the start-up of either pass may keep at a window's kept samples. */
export const FILTER_TAIL = 1e-12;

/**
 * Samples either side of a window that the filter's start-up needs to decay below FILTER_TAIL
 * (the sections in series: their decay lengths add up), plus a few for the polynomial factor
 * of a pole's response. 0 without filters.
 */
export function filterMargin(sections: readonly Biquad[]): number {
  if (sections.length === 0) return 0;
  let m = 0;
  for (const s of sections) {
    const r = poleRadius(s);
    if (!(r < 1)) throw new RangeError("the low-pass is not stable");
    m += Math.log(FILTER_TAIL) / Math.log(r);
  }
  return Math.ceil(1.25 * m) + 16;
}

/**
 * filtfilt of a window x; its samples at least filterMargin from both of the window's ends (or
 * from a window end that is the stretch's own) equal the batch filter's within FILTER_TAIL.
 */
export function filterWindow(x: Float64Array, sections: readonly Biquad[]): Float64Array {
  return sections.length ? filtfilt(x, sections) : x;
}
