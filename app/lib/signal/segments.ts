/**
 * Operating segments from the crank speed profile: start, idle, steady, run-up, coast-down.
 *
 * Method: the crank speed is averaged into 0.1 s frames and smoothed with a 1 s moving average.
 * Steady means the speed holds: a stretch of at least `minSteadyS` in which the speed stays
 * within ±B of its mid value, B = max(`bandMinRpm`, `bandFraction` · speed), and whose
 * least-squares parabola moves by less than B and line by less than B per 10 s (so a slow sweep,
 * which also crosses any band slowly, is not steady: across a window whose range is 2B its
 * fitted trend moves by ≈ 2B, and by 15/16 · 2B over the turn of an up-and-down sweep). Steady
 * stretches at the idle speed are idle. Everything else is run-up or coast-down by the sign of
 * the slope over ±0.5 s, so a slow sweep 800 → 4000 → 800 rpm is a run-up and a coast-down
 * whatever its rate. Runs shorter than `minDurationS` are merged into their longer neighbour.
 * Speeds are rpm, times s. docs/signal-computation.md, step 12, states the band.
 */
import { RPM_PER_RAD_S } from "./firing-order.ts";

export type SegmentKind = "start" | "idle" | "steady" | "run-up" | "coast-down";

export interface Segment {
  kind: SegmentKind;
  startS: number;
  endS: number;
  meanRpm: number;
}

export interface SegmentOptions {
  /** Half-width of the steady band as a fraction of the speed. Default 0.02 (±2 %). */
  bandFraction?: number;
  /** Least half-width of the steady band, rpm. Default 25 (so ±25 rpm up to 1250 rpm). */
  bandMinRpm?: number;
  /** Shortest steady (or idle) stretch, s. Default 3. */
  minSteadyS?: number;
  /** Segments shorter than this are merged into a neighbour, s. Default 1.5. */
  minDurationS?: number;
  /** Idle speeds are looked for in this band, rpm. Default 450–1300. */
  idleBandRpm?: [number, number];
}

/** Length of the frames the crank speed is averaged in, s. */
export const SEGMENT_FRAME_S = 0.1;
const FRAME_S = SEGMENT_FRAME_S;
/** A steady stretch's line may move at most B in this time (frames below), s. */
const RATE_REF_S = 10;
const rateRefFrames = RATE_REF_S / FRAME_S;
/** Below this |slope| a frame outside a steady stretch has no direction of its own, rpm/s. */
const FLAT_RPM_S = 1;
/** Longest rise from cranking to running speed that still counts as a start, s. */
const START_RISE_S = 3;

function movingAverage(x: Float64Array, half: number): Float64Array {
  const n = x.length;
  const prefix = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) prefix[i + 1] = prefix[i]! + x[i]!;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const a = Math.max(0, i - half);
    const b = Math.min(n, i + half + 1);
    out[i] = (prefix[b]! - prefix[a]!) / (b - a);
  }
  return out;
}

/**
 * The trend of y[a…b): `span`, how far its least-squares parabola moves across the stretch
 * (max − min), and `rise`, the end-to-end change of its least-squares line, both in the unit of
 * y. Orthogonal basis 1, x, x² − mean(x²) on the symmetric grid x ∈ [−1, 1], so the line's
 * slope is the parabola's x coefficient.
 */
export function trendOf(y: Float64Array, a: number, b: number): { span: number; rise: number } {
  const n = b - a;
  if (n < 3) return { span: 0, rise: 0 };
  const h = (n - 1) / 2;
  let m2 = 0;
  for (let i = 0; i < n; i++) m2 += ((i - h) / h) ** 2;
  m2 /= n;
  let s1 = 0;
  let s2 = 0;
  let p1 = 0;
  let p2 = 0;
  const ref = y[a]!;
  for (let i = 0; i < n; i++) {
    const x = (i - h) / h;
    const q = x * x - m2;
    const v = y[a + i]! - ref;
    s1 += v * x;
    s2 += v * q;
    p1 += x * x;
    p2 += q * q;
  }
  const c1 = s1 / p1;
  const c2 = s2 / p2;
  const at = (x: number) => c1 * x + c2 * x * x; // the constant part does not move
  const vals = [at(-1), at(1)];
  if (c2 !== 0 && Math.abs(c1 / (2 * c2)) < 1) vals.push(at(-c1 / (2 * c2)));
  return { span: Math.max(...vals) - Math.min(...vals), rise: 2 * c1 };
}

/** Steady stretches [a, b) of frames: the speed within ±B for minFrames or more, no trend (see top). */
export function findHolds(
  rpm: Float64Array,
  minFrames: number,
  band: (rpm: number) => number,
): [number, number][] {
  const n = rpm.length;
  const holds: [number, number][] = [];
  let a = 0;
  while (a < n) {
    let lo = rpm[a]!;
    let hi = lo;
    let b = a + 1;
    for (; b < n; b++) {
      const l = Math.min(lo, rpm[b]!);
      const h = Math.max(hi, rpm[b]!);
      if (h - l > 2 * band(0.5 * (h + l))) break;
      lo = l;
      hi = h;
    }
    if (b - a < minFrames) {
      a++;
      continue;
    }
    // The longest stretch from a may begin and end on the ramps around a hold: its ends farther
    // than B from its median are trimmed (what stays of a ramp crosses at most B: B/rate in time).
    const B = band(0.5 * (lo + hi));
    const sorted = Array.from(rpm.subarray(a, b)).sort((x, y) => x - y);
    const med = sorted[sorted.length >> 1]!;
    let s = a;
    let e = b;
    while (s < e && Math.abs(rpm[s]! - med) > B) s++;
    while (e > s && Math.abs(rpm[e - 1]! - med) > B) e--;
    // No trend: the parabola moves less than B (a sweep's stretch moves ≈ 2B, its turn 15/16 of
    // 2B), and the line less than B per RATE_REF_S (a stretch cut short by the log's start or
    // end has not had the time to cross the band).
    const t = trendOf(rpm, s, e);
    if (e - s >= minFrames && t.span < B && Math.abs(t.rise) * (rateRefFrames / (e - s)) < B) {
      holds.push([s, e]);
      a = e;
    } else a++;
  }
  return holds;
}

/** Idle speed (rpm): median of the lowest cluster of steady frames inside the idle band, or null. */
export function estimateIdleRpm(
  rpm: Float64Array,
  holds: [number, number][],
  band: [number, number],
): number | null {
  const vals: number[] = [];
  for (const [a, b] of holds)
    for (let f = a; f < b; f++) if (rpm[f]! >= band[0] && rpm[f]! <= band[1]) vals.push(rpm[f]!);
  if (vals.length === 0) return null;
  vals.sort((x, y) => x - y);
  // The lowest steady cluster is idle: the median of the values within 150 rpm of the lowest.
  const lowest = vals[0]!;
  const cluster = vals.filter((v) => v < lowest + 150);
  return cluster[cluster.length >> 1]!;
}

/**
 * Operating segments (method above). In: `timeS` in s, ascending; `crankRadS` in rad/s; options
 * as SegmentOptions (own choices, no published source). Out: consecutive segments over the log:
 * kind, start and end in s (to 1 ms), mean crank speed in rpm (to 0.1); none below two samples.
 */
export function findSegments(
  timeS: Float64Array,
  crankRadS: Float64Array,
  options: SegmentOptions = {},
): Segment[] {
  const n = timeS.length;
  if (n < 2) return [];
  const t0 = timeS[0]!;
  const frames = Math.max(1, Math.ceil((timeS[n - 1]! - t0) / FRAME_S));
  const sum = new Float64Array(frames);
  const cnt = new Float64Array(frames);
  // Times ascend, so the frame index only moves forward.
  let f = 0;
  let edge = t0 + FRAME_S;
  for (let i = 0; i < n; i++) {
    while (timeS[i]! >= edge && f < frames - 1) {
      f++;
      edge = t0 + (f + 1) * FRAME_S;
    }
    sum[f] = sum[f]! + crankRadS[i]!;
    cnt[f] = cnt[f]! + 1;
  }
  return segmentsFromFrames(frameRpm(sum, cnt), t0, timeS[n - 1]!, options);
}

/** Frame means in rpm from the frames' sums and counts of crank speed (rad/s); an empty frame repeats the one before. */
export function frameRpm(sum: Float64Array, cnt: Float64Array): Float64Array {
  const frames = sum.length;
  const raw = new Float64Array(frames);
  for (let f = 0; f < frames; f++)
    raw[f] = cnt[f]! > 0 ? (sum[f]! / cnt[f]!) * RPM_PER_RAD_S : f > 0 ? raw[f - 1]! : 0;
  return raw;
}

/**
 * findSegments from the stretch's SEGMENT_FRAME_S frame means `raw` (rpm, frameRpm), the time
 * of its first sample `t0` and of its last `tEnd`, s: the same segments, without the samples.
 */
export function segmentsFromFrames(
  raw: Float64Array,
  t0: number,
  tEnd: number,
  options: SegmentOptions = {},
): Segment[] {
  const bandFraction = options.bandFraction ?? 0.02;
  const bandMin = options.bandMinRpm ?? 25;
  const minSteadyS = options.minSteadyS ?? 3;
  const minDur = options.minDurationS ?? 1.5;
  const idleBand = options.idleBandRpm ?? [450, 1300];
  const frames = raw.length;
  const rpm = movingAverage(raw, 5);
  const slope = new Float64Array(frames);
  for (let f = 0; f < frames; f++) {
    const a = Math.max(0, f - 5);
    const b = Math.min(frames - 1, f + 5);
    slope[f] = b > a ? (rpm[b]! - rpm[a]!) / ((b - a) * FRAME_S) : 0;
  }
  const holds = findHolds(rpm, Math.round(minSteadyS / FRAME_S), (v) =>
    Math.max(bandMin, bandFraction * Math.abs(v)),
  );
  const idle = estimateIdleRpm(rpm, holds, idleBand);
  const idleTol = idle === null ? 0 : Math.max(100, 0.15 * idle);
  const kinds: SegmentKind[] = new Array(frames);
  // Direction by the slope's sign; a frame without a slope (standstill) continues the kind before.
  for (let f = 0; f < frames; f++) {
    const sl = slope[f]!;
    if (Math.abs(sl) >= FLAT_RPM_S || f === 0) kinds[f] = sl >= 0 ? "run-up" : "coast-down";
    else kinds[f] = kinds[f - 1]!;
  }
  for (const [a, b] of holds) {
    let s = 0;
    for (let f = a; f < b; f++) s += rpm[f]!;
    const isIdle = idle !== null && Math.abs(s / (b - a) - idle) < idleTol;
    for (let f = a; f < b; f++) kinds[f] = isIdle ? "idle" : "steady";
  }
  // A start: from standstill or cranking (below 0.4× idle), up through running speed (0.6× idle)
  // within START_RISE_S, through the flare-up, to the first idle or steady frame. A slow climb
  // from low speed is a run-up, not a start.
  const runningRpm = 0.6 * (idle ?? 800);
  const crankingRpm = 0.4 * (idle ?? 800);
  for (let f = 0; f < frames; f++) {
    if (rpm[f]! >= runningRpm || (f > 0 && kinds[f - 1] === "coast-down")) continue;
    let g = f;
    let lastLow = -1;
    while (g < frames && rpm[g]! < runningRpm) {
      if (rpm[g]! < crankingRpm) lastLow = g;
      g++;
    }
    if (g >= frames) break; // never reached running speed: not a start
    if (lastLow < 0 || (g - lastLow) * FRAME_S > START_RISE_S) {
      f = g;
      continue;
    }
    while (
      g < frames &&
      (kinds[g] === "run-up" || kinds[g] === "coast-down") &&
      rpm[g]! < 1.5 * (idle ?? 800)
    )
      g++;
    for (let h = f; h < g; h++) kinds[h] = "start";
    f = g;
  }
  return mergeRuns(kinds, rpm, t0, tEnd, minDur);
}

function mergeRuns(
  kinds: SegmentKind[],
  rpm: Float64Array,
  t0: number,
  tEnd: number,
  minDur: number,
): Segment[] {
  type Run = { kind: SegmentKind; a: number; b: number };
  let runs: Run[] = [];
  kinds.forEach((k, f) => {
    const last = runs[runs.length - 1];
    if (last && last.kind === k) last.b = f + 1;
    else runs.push({ kind: k, a: f, b: f + 1 });
  });
  // Merge the shortest short run into its longer neighbour until none is left (a start is kept).
  for (;;) {
    let iShort = -1;
    runs.forEach((r, i) => {
      const len = (r.b - r.a) * FRAME_S;
      if (
        len < minDur &&
        r.kind !== "start" &&
        runs.length > 1 &&
        (iShort < 0 || len < (runs[iShort]!.b - runs[iShort]!.a) * FRAME_S)
      )
        iShort = i;
    });
    if (iShort < 0) break;
    const prev = runs[iShort - 1];
    const next = runs[iShort + 1];
    const into = !prev ? next! : !next ? prev : prev.b - prev.a >= next.b - next.a ? prev : next;
    into.a = Math.min(into.a, runs[iShort]!.a);
    into.b = Math.max(into.b, runs[iShort]!.b);
    runs.splice(iShort, 1);
    const joined: Run[] = [];
    for (const r of runs) {
      const last = joined[joined.length - 1];
      if (last && last.kind === r.kind) last.b = r.b;
      else joined.push({ ...r });
    }
    runs = joined;
  }
  return runs.map((r) => {
    let s = 0;
    for (let f = r.a; f < r.b; f++) s += rpm[f]!;
    return {
      kind: r.kind,
      startS: Math.round((t0 + r.a * FRAME_S) * 1000) / 1000,
      endS: Math.round(Math.min(tEnd, t0 + r.b * FRAME_S) * 1000) / 1000,
      meanRpm: Math.round((s / (r.b - r.a)) * 10) / 10,
    };
  });
}
