/**
 * The channel chooser's preview of the picked speeds: crank and gearbox-input speed against time,
 * decimated to a few hundred points. Unlike the speed trace's bucket means, each bucket gives its
 * minimum and its maximum (in time order), so a dropout, a spike or a channel in the wrong unit
 * is not averaged away in the small chart. Sections (gaps too long to repair) are separated by a
 * null point, as in the speed trace.
 */
import { RPM_PER_RAD_S } from "./firing-order.ts";
import { round } from "./order-curves.ts";
import { sectionsOf } from "./section-analysis.ts";
import type { DriveLog } from "./types.ts";

/** Buckets over the whole log; two points each. */
export const PREVIEW_BUCKETS = 200;

export interface SpeedPreview {
  /** s; the middle of the gap at a section break. */
  timeS: number[];
  /** rpm; null separates two sections. */
  crankRpm: (number | null)[];
  gearboxRpm: (number | null)[];
}

/** Index of the smallest and largest value in [a, b). */
function extremes(x: Float64Array, a: number, b: number): [number, number] {
  let lo = a;
  let hi = a;
  for (let i = a + 1; i < b; i++) {
    if (x[i]! < x[lo]!) lo = i;
    if (x[i]! > x[hi]!) hi = i;
  }
  return [lo, hi];
}

/**
 * Per bucket of consecutive samples, two points: at the bucket's first and last time, the crank's
 * and the gearbox's minimum and maximum in the order they occur. Every sample's value lies within
 * the preview's range, and the range's ends are samples.
 */
export function speedPreview(log: DriveLog, buckets = PREVIEW_BUCKETS): SpeedPreview {
  const { timeS, crankRadS, gearboxRadS } = log;
  const n = timeS.length;
  const out: SpeedPreview = { timeS: [], crankRpm: [], gearboxRpm: [] };
  const rpm = (v: number) => round(v * RPM_PER_RAD_S, 1);
  sectionsOf(log).forEach((s, k, parts) => {
    if (k > 0) {
      out.timeS.push(round((parts[k - 1]!.endS + s.startS) / 2, 4));
      out.crankRpm.push(null);
      out.gearboxRpm.push(null);
    }
    const count = s.endIndex - s.startIndex;
    const per = Math.max(1, Math.ceil(count / Math.max(1, Math.floor((buckets * count) / n))));
    for (let a = s.startIndex; a < s.endIndex; a += per) {
      const b = Math.min(s.endIndex, a + per);
      if (b - a === 1) {
        // A short log keeps every sample: one point, not two at the same time.
        out.timeS.push(round(timeS[a]!, 4));
        out.crankRpm.push(rpm(crankRadS[a]!));
        out.gearboxRpm.push(rpm(gearboxRadS[a]!));
        continue;
      }
      const c = extremes(crankRadS, a, b);
      const g = extremes(gearboxRadS, a, b);
      const cOrder: [number, number] = c[0] <= c[1] ? c : [c[1], c[0]];
      const gOrder: [number, number] = g[0] <= g[1] ? g : [g[1], g[0]];
      out.timeS.push(round(timeS[a]!, 4), round(timeS[b - 1]!, 4));
      out.crankRpm.push(rpm(crankRadS[cOrder[0]]!), rpm(crankRadS[cOrder[1]]!));
      out.gearboxRpm.push(rpm(gearboxRadS[gOrder[0]]!), rpm(gearboxRadS[gOrder[1]]!));
    }
  });
  return out;
}
