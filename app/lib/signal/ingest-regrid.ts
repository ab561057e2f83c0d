/**
 * The sample work of the repairs (ingest-repairs.ts decides what to repair): linear filling of
 * dropouts in place, and the rebuild of a log whose sections are copied as they are or resampled
 * onto a uniform time grid (missing rows, jitter). Units: s and rad/s.
 *
 * Why these interpolations:
 * - Dropouts and missing rows are filled linearly in time. Over a hole of at most 20 samples a
 *   straight line adds nothing that was not measured (no overshoot, no invented ripple); what it
 *   loses is the ripple inside the hole, a few samples of the hundreds in an order-tracking
 *   block, so the block's amplitudes drop by about that fraction (3 of 320 samples ≈ 0.08 dB)
 *   and, where both channels are filled alike, the isolation (their ratio) not at all.
 * - Jittered timestamps are resampled by 4-point cubic Lagrange interpolation on the actual
 *   sample times (the same interpolation order-tracking uses in angle, angle-grid.ts): its error
 *   falls with the fourth power of frequency × interval, against the second power for a line, so
 *   the firing order below a fifth of the sampling rate keeps its amplitude to a fraction of a
 *   per cent (the Lagrange remainder f⁗(ξ)/4!·∏(τ − tᵢ) of any numerical-analysis textbook).
 */

import type { DriveLog, LogRepair, LogSection } from "./types.ts";

/** Fills NaN runs of x strictly inside (p, q) by linear interpolation in time (x[p], x[q] finite). */
export function fillLinear(x: Float64Array, t: Float64Array, p: number, q: number): void {
  let left = p;
  for (let i = p + 1; i < q; i++) {
    if (x[i] === x[i]) {
      left = i;
      continue;
    }
    let right = i + 1;
    while (right < q && x[right] !== x[right]) right++;
    const x0 = x[left]!;
    const t0 = t[left]!;
    const slope = (x[right]! - x0) / (t[right]! - t0);
    for (let k = i; k < right; k++) x[k] = x0 + slope * (t[k]! - t0);
    i = right - 1;
  }
}

/** A stretch [a, b) of the original samples, copied as is or resampled onto t[a] + k·step. */
export interface SectionPlan {
  a: number;
  b: number;
  regrid: boolean;
}

/** Samples a planned section has after the rebuild. */
export function planLength(s: SectionPlan, t: Float64Array, step: number): number {
  if (!s.regrid || s.b - s.a < 2) return s.b - s.a;
  return Math.floor((t[s.b - 1]! - t[s.a]!) / step + 1e-6) + 1;
}

/**
 * New arrays for the planned sections, back to back: `channels[0]` is time; the others are
 * interpolated. An interval longer than `gapS` (a filled gap) and its neighbours are crossed
 * linearly, everything else by 4-point cubic Lagrange on the actual times (4 nodes around the
 * point, shifted inwards at a section's ends). Returns the arrays and each section's start
 * index in them.
 */
export function rebuild(
  channels: Float64Array[],
  plans: SectionPlan[],
  step: number,
  gapS: number,
): { out: Float64Array[]; starts: number[] } {
  const t = channels[0]!;
  const lengths = plans.map((s) => planLength(s, t, step));
  const total = lengths.reduce((x, y) => x + y, 0);
  const out = channels.map(() => new Float64Array(total));
  const starts: number[] = [];
  const w = new Float64Array(4);
  let at = 0;
  plans.forEach((s, k) => {
    starts.push(at);
    if (!s.regrid || s.b - s.a < 2) {
      channels.forEach((x, c) => out[c]!.set(x.subarray(s.a, s.b), at));
      at += s.b - s.a;
      return;
    }
    const len = lengths[k]!;
    const t0 = t[s.a]!;
    const isGap = (i: number) => i < s.a || i + 1 >= s.b || t[i + 1]! - t[i]! > gapS;
    let j = s.a;
    for (let m = 0; m < len; m++) {
      const tau = t0 + m * step;
      while (j < s.b - 2 && t[j + 1]! <= tau) j++;
      const o = at + m;
      out[0]![o] = tau;
      // Nodes j−1 … j+2, shifted inwards at the section's ends (one-sided there, still cubic).
      const i0 = Math.max(s.a, Math.min(j - 1, s.b - 4));
      if (i0 < s.a || isGap(j) || isGap(i0) || isGap(i0 + 1) || isGap(i0 + 2)) {
        const u = Math.min(1, Math.max(0, (tau - t[j]!) / (t[j + 1]! - t[j]!)));
        for (let c = 1; c < channels.length; c++) {
          const x = channels[c]!;
          out[c]![o] = x[j]! + u * (x[j + 1]! - x[j]!);
        }
        continue;
      }
      lagrangeWeights(t, i0, tau, w);
      for (let c = 1; c < channels.length; c++) {
        const x = channels[c]!;
        out[c]![o] = w[0]! * x[i0]! + w[1]! * x[i0 + 1]! + w[2]! * x[i0 + 2]! + w[3]! * x[i0 + 3]!;
      }
    }
    at += len;
  });
  return { out, starts };
}

/** Weights of the cubic through the nodes t[i0 … i0+3], evaluated at tau (Lagrange form). */
function lagrangeWeights(t: Float64Array, i0: number, tau: number, w: Float64Array): void {
  for (let m = 0; m < 4; m++) {
    let v = 1;
    const tm = t[i0 + m]!;
    for (let l = 0; l < 4; l++) if (l !== m) v *= (tau - t[i0 + l]!) / (tm - t[i0 + l]!);
    w[m] = v;
  }
}

/** Index of the sample of `t` (ascending) nearest to time x. */
export function nearestIndex(t: Float64Array, x: number): number {
  let lo = 0;
  let hi = t.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (t[mid]! <= x) lo = mid;
    else hi = mid;
  }
  return Math.abs(t[hi]! - x) < Math.abs(x - t[lo]!) ? hi : lo;
}

/**
 * Applies a repair plan (ingest-repairs.ts) to `log`: new arrays only when samples are left out
 * or resampled (dropouts alone were filled in place); the sections when more than one; the
 * repair records. `rowOf` of the result maps a new sample to the file row nearest in time.
 */
export function applyPlan(
  log: DriveLog,
  rowOf: (i: number) => number,
  plans: SectionPlan[],
  nom: number,
  gapS: number,
  repairs: LogRepair[],
): { log: DriveLog; rowOf: (i: number) => number } {
  const n = log.timeS.length;
  const kept = plans.reduce((s, x) => s + x.b - x.a, 0);
  let out = log;
  let outRowOf = rowOf;
  let starts = plans.map((x) => x.a);
  if (kept < n || plans.some((x) => x.regrid)) {
    const extraNames = Object.keys(log.extra);
    const channels = [
      log.timeS,
      log.crankRadS,
      log.gearboxRadS,
      ...extraNames.map((k) => log.extra[k]!),
    ];
    const built = rebuild(channels, plans, nom, gapS);
    const [timeS, crankRadS, gearboxRadS, ...extras] = built.out as [
      Float64Array,
      Float64Array,
      Float64Array,
    ];
    const oldT = log.timeS;
    out = {
      ...log,
      timeS,
      crankRadS,
      gearboxRadS,
      extra: Object.fromEntries(extraNames.map((k, i) => [k, extras[i]!])),
    };
    outRowOf = (i: number) => rowOf(nearestIndex(oldT, timeS[i] ?? 0));
    starts = built.starts;
  }
  const t = out.timeS;
  const sections: LogSection[] = starts.map((s, k) => {
    const e = k + 1 < starts.length ? starts[k + 1]! : t.length;
    return { startIndex: s, endIndex: e, startS: t[s]!, endS: t[e - 1]! };
  });
  let samples = 0;
  let span = 0;
  for (const s of sections) {
    samples += s.endIndex - s.startIndex - 1;
    span += s.endS - s.startS;
  }
  const multi = sections.length > 1;
  out = {
    ...out,
    ...(multi ? { sections } : {}),
    // Gaps between sections are not sampling time: the rate is the sections' own.
    sampleRateHz: multi && span > 0 ? samples / span : out.sampleRateHz,
    source: { ...out.source, repairs: [...(out.source.repairs ?? []), ...repairs] },
  };
  if (out !== log && !multi && out.timeS !== log.timeS) {
    const last = t.length - 1;
    out.sampleRateHz = last > 0 ? last / (t[last]! - t[0]!) : out.sampleRateHz;
  }
  return { log: out, rowOf: outRowOf };
}
