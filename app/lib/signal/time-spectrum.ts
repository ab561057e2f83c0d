/**
 * Time-domain (frequency) spectrum of one segment, for both channels.
 *
 * Welch-style averaging: Hann-windowed (periodic) frames of `frameLength` samples with 50 %
 * overlap, mean removed per frame, single-sided 0-peak amplitude per frame (spectrum.ts),
 * power-averaged over frames. Amplitudes in rpm (0-peak), frequencies in Hz. The output is
 * limited to 1.5× the top order at the segment's speed and to MAX_POINTS points (by taking the
 * largest amplitude of each group of bins, so narrow lines survive).
 */
import { RPM_PER_RAD_S } from "./firing-order.ts";
import { round } from "./order-curves.ts";
import { createAmplitudePlan } from "./spectrum.ts";
import type { Segment } from "./segments.ts";

export const MAX_POINTS = 2048;
/** Target frequency resolution in Hz (the frame length is the power of two nearest to fs/0.25). */
export const TARGET_RESOLUTION_HZ = 0.25;

export interface TimeSpectrum {
  segmentKind: Segment["kind"];
  startS: number;
  endS: number;
  meanRpm: number;
  frequencyResolutionHz: number;
  frames: number;
  frequencyHz: number[];
  crankRpm: number[];
  gearboxRpm: number[];
}

/**
 * Frequency spectrum of both channels over one segment (docs/signal-computation.md, step 14):
 * Welch-style averaging of Hann frames (Welch 1967, from memory), amplitude scaling as in
 * spectrum.ts (Heinzel, Rüdiger & Schilling 2002).
 *
 * In: `timeS` in s, `crankRadS` and `gearboxRadS` in rad/s, `sampleRateHz` fs in Hz, the
 * `segment` to read (start and end in s, mean speed in rpm) and `topOrder` in orders per crank
 * revolution. The frame is the largest power of two (at least 64 samples) that fits in the
 * segment and is not above fs / TARGET_RESOLUTION_HZ (0.25 Hz resolution); frames overlap 50 %.
 *
 * Out: null when the segment holds fewer than 64 samples; else frequencies in Hz up to
 * 1.5 × topOrder × the segment's speed (and fs/2), power-averaged 0-peak amplitudes of each
 * channel in rpm, at most MAX_POINTS points (each group of bins keeps its largest value), the
 * resolution in Hz and the number of frames averaged.
 */
export function timeSpectrum(args: {
  timeS: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  sampleRateHz: number;
  segment: Segment;
  topOrder: number;
}): TimeSpectrum | null {
  const { timeS, segment: seg, sampleRateHz: fs } = args;
  // The segment's samples: the first at or after its start up to the first at or after its end.
  let i0 = 0;
  while (i0 < timeS.length && timeS[i0]! < seg.startS) i0++;
  let i1 = i0;
  while (i1 < timeS.length && timeS[i1]! < seg.endS) i1++;
  return spectrumOfRange({
    frameAt: (a, b) => [args.crankRadS.subarray(a, b), args.gearboxRadS.subarray(a, b)],
    i0,
    i1,
    sampleRateHz: fs,
    segment: seg,
    topOrder: args.topOrder,
  });
}

/**
 * timeSpectrum over samples [i0, i1) (the segment's), each frame's crank and gearbox samples
 * [a, b) handed out by `frameAt` (so they can come from a file, stream/spectrum-windows.ts).
 */
export function spectrumOfRange(args: {
  frameAt: (a: number, b: number) => [Float64Array, Float64Array];
  i0: number;
  i1: number;
  sampleRateHz: number;
  segment: Segment;
  topOrder: number;
}): TimeSpectrum | null {
  const { i0, i1, segment: seg, sampleRateHz: fs } = args;
  const len = i1 - i0;
  if (len < 64) return null;
  let frame = 64;
  while (frame * 2 <= len && frame * 2 <= fs / TARGET_RESOLUTION_HZ) frame *= 2;
  const plan = createAmplitudePlan(frame);
  const hop = frame >> 1;
  const pc = new Float64Array(plan.bins);
  const pg = new Float64Array(plan.bins);
  const a = new Float64Array(plan.bins);
  let frames = 0;
  for (let s = i0; s + frame <= i1; s += hop) {
    const [c, g] = args.frameAt(s, s + frame);
    plan.amplitudes(c, a);
    for (let k = 0; k < plan.bins; k++) pc[k] = pc[k]! + a[k]! * a[k]!;
    plan.amplitudes(g, a);
    for (let k = 0; k < plan.bins; k++) pg[k] = pg[k]! + a[k]! * a[k]!;
    frames++;
  }
  const df = fs / frame;
  const fTop = Math.min(fs / 2, 1.5 * args.topOrder * (seg.meanRpm / 60));
  const lastBin = Math.min(plan.bins - 1, Math.ceil(fTop / df));
  const group = Math.max(1, Math.ceil((lastBin + 1) / MAX_POINTS));
  const out: TimeSpectrum = {
    segmentKind: seg.kind,
    startS: seg.startS,
    endS: seg.endS,
    meanRpm: seg.meanRpm,
    frequencyResolutionHz: round(df * group, 4),
    frames,
    frequencyHz: [],
    crankRpm: [],
    gearboxRpm: [],
  };
  for (let k0 = 0; k0 <= lastBin; k0 += group) {
    let c = 0;
    let g = 0;
    let kBest = k0;
    for (let k = k0; k < Math.min(k0 + group, lastBin + 1); k++) {
      if (pc[k]! > c) {
        c = pc[k]!;
        kBest = k;
      }
      g = Math.max(g, pg[k]!);
    }
    out.frequencyHz.push(round(kBest * df, 4));
    out.crankRpm.push(round(Math.sqrt(c / frames) * RPM_PER_RAD_S));
    out.gearboxRpm.push(round(Math.sqrt(g / frames) * RPM_PER_RAD_S));
  }
  return out;
}

/** The longest idle or steady segment (idle preferred when equally long), or null. */
export function pickSpectrumSegment(segments: readonly Segment[]): Segment | null {
  let best: Segment | null = null;
  for (const s of segments) {
    if ((s.kind !== "idle" && s.kind !== "steady") || s.meanRpm < 100) continue;
    if (!best || s.endS - s.startS > best.endS - best.startS) best = s;
  }
  return best;
}
