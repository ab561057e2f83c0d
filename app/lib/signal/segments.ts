/**
 * Operating segments from the crank speed profile: start, idle, steady, run-up, coast-down.
 *
 * Method: the crank speed is averaged into 0.1 s frames, smoothed with a 1 s moving average and
 * differentiated over ±0.5 s (slope in rpm/s). Each frame is classified, runs of one kind are
 * formed and runs shorter than `minDurationS` are merged into their longer neighbour.
 * Speeds are rpm, times s.
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
  /** |slope| below this is steady, rpm/s. Default 40. */
  steadySlopeRpmS?: number;
  /** Segments shorter than this are merged into a neighbour, s. Default 1.5. */
  minDurationS?: number;
  /** Idle speeds are looked for in this band, rpm. Default 450–1300. */
  idleBandRpm?: [number, number];
}

const FRAME_S = 0.1;
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

/** Idle speed (rpm): median of steady frames inside the idle band, or null when there are none. */
export function estimateIdleRpm(
  rpm: Float64Array,
  slope: Float64Array,
  thr: number,
  band: [number, number],
): number | null {
  const vals: number[] = [];
  for (let i = 0; i < rpm.length; i++) {
    if (Math.abs(slope[i]!) < thr && rpm[i]! >= band[0] && rpm[i]! <= band[1]) vals.push(rpm[i]!);
  }
  if (vals.length === 0) return null;
  vals.sort((a, b) => a - b);
  // The lowest steady cluster is idle: take the median of the lower quarter-range of values.
  const lowest = vals[0]!;
  const cluster = vals.filter((v) => v < lowest + 150);
  return cluster[cluster.length >> 1]!;
}

export function findSegments(
  timeS: Float64Array,
  crankRadS: Float64Array,
  options: SegmentOptions = {},
): Segment[] {
  const thr = options.steadySlopeRpmS ?? 40;
  const minDur = options.minDurationS ?? 1.5;
  const band = options.idleBandRpm ?? [450, 1300];
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
  const raw = new Float64Array(frames);
  for (let f = 0; f < frames; f++)
    raw[f] = cnt[f]! > 0 ? (sum[f]! / cnt[f]!) * RPM_PER_RAD_S : f > 0 ? raw[f - 1]! : 0;
  const rpm = movingAverage(raw, 5);
  const slope = new Float64Array(frames);
  for (let f = 0; f < frames; f++) {
    const a = Math.max(0, f - 5);
    const b = Math.min(frames - 1, f + 5);
    slope[f] = b > a ? (rpm[b]! - rpm[a]!) / ((b - a) * FRAME_S) : 0;
  }
  const idle = estimateIdleRpm(rpm, slope, thr, band);
  const idleTol = idle === null ? 0 : Math.max(100, 0.15 * idle);
  const runningRpm = 0.6 * (idle ?? 800);
  const kinds: SegmentKind[] = new Array(frames);
  for (let f = 0; f < frames; f++) {
    const s = slope[f]!;
    if (Math.abs(s) < thr)
      kinds[f] = idle !== null && Math.abs(rpm[f]! - idle) < idleTol ? "idle" : "steady";
    else kinds[f] = s > 0 ? "run-up" : "coast-down";
  }
  // A start: from standstill or cranking (below 0.4× idle), up through running speed (0.6× idle)
  // within START_RISE_S, through the flare-up, to the first idle or steady frame. A slow climb
  // from low speed is a run-up, not a start.
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
  return mergeRuns(kinds, rpm, t0, timeS[n - 1]!, minDur);
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
