/**
 * The idle rattle check (rattle.ts) over a SampleSource, one idle segment at a time and each in
 * chunks of `windowSamples`, for the bounded-memory analysis (analyse-samples.ts). A chunk is
 * read with the low-pass margin (filtered-window.ts) plus half a firing period and the central
 * difference's neighbour on each side, so its gearbox acceleration |α(t)| and the running max
 * over one firing period equal the whole segment's; the spans over the limit and the trace's
 * bucket maxima are carried from chunk to chunk. docs/signal-computation.md, "Bounded-memory
 * analysis".
 */
import { butterworthLowpass4 } from "../lowpass.ts";
import type { TrackedBlocks } from "../order-tracking.ts";
import { round } from "../order-curves.ts";
import { idleOrderAccel, rattleResult, type RattleCheck, type RattleSpan } from "../rattle.ts";
import type { SampleSource } from "../sample-source.ts";
import { slidingMax } from "../sliding-max.ts";
import type { Segment } from "../segments.ts";
import { TRACE_POINTS } from "../traces.ts";
import { filterMargin, filterWindow } from "./filtered-window.ts";

/** Index of the first sample at or after time t (binary search over the source's times). */
export function indexAtTime(source: SampleSource, t: number): number {
  let lo = 0;
  let hi = source.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (source.read(mid, mid + 1).timeS[0]! < t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** rattleCheck over the source's samples (same inputs, the arrays replaced by the source). */
export function rattleWindows(args: {
  source: SampleSource;
  sampleRateHz: number;
  tracked: TrackedBlocks;
  segments: readonly Segment[];
  firingOrder: number;
  limitRadS2: number;
  windowSamples: number;
}): RattleCheck | null {
  const { source, firingOrder: q, limitRadS2: limit, sampleRateHz: fs } = args;
  const idle = args.segments.filter((s) => s.kind === "idle");
  const order = idleOrderAccel(args.tracked, idle, q);
  if (!order) return null;
  const firingHz = (order.omega / (2 * Math.PI)) * q;
  const cutoff = 2.5 * firingHz;
  const sections = cutoff < 0.45 * fs ? butterworthLowpass4(cutoff, fs) : [];
  const guard = Math.ceil(fs / firingHz);
  const half = Math.max(1, guard >> 1);
  const margin = filterMargin(sections) + half + 2;
  const ranges = idle.map((s) => [indexAtTime(source, s.startS), indexAtTime(source, s.endS)]);
  const idleSamples = ranges.reduce((n, [a, b]) => n + b! - a!, 0);
  let peak = 0;
  let idleS = 0;
  const spans: RattleSpan[] = [];
  const trace: RattleCheck["accelTrace"] = { timeS: [], radS2: [] };
  idle.forEach((seg, k) => {
    idleS += seg.endS - seg.startS;
    const [i0, i1] = ranges[k] as [number, number];
    const L = i1 - i0;
    if (L < 4 * guard) return;
    const innerLen = L - 2 * guard;
    const points = Math.ceil((TRACE_POINTS * innerLen) / Math.max(1, idleSamples));
    const per = Math.max(1, Math.ceil(innerLen / Math.max(1, points)));
    const pieceT: number[] = [];
    const pieceV: number[] = [];
    let bestV = -Infinity;
    let bestT = 0;
    let open = -1;
    let tOpen = 0;
    let spanPeak = 0;
    let tLastInner = 0;
    for (let c0 = 0; c0 < L; c0 += args.windowSamples) {
      const c1 = Math.min(L, c0 + args.windowSamples);
      const r0 = Math.max(0, c0 - margin);
      const r1 = Math.min(L, c1 + margin);
      const w = source.read(i0 + r0, i0 + r1);
      const y = filterWindow(w.gearboxRadS, sections);
      const t = w.timeS;
      // |α| at segment samples [r0, r1): 0 at the segment's own first and last (as rattle.ts).
      const acc = new Float64Array(r1 - r0);
      for (let j = 1; j < acc.length - 1; j++)
        acc[j] = Math.abs((y[j + 1]! - y[j - 1]!) / (t[j + 1]! - t[j - 1]!));
      const from = Math.max(c0, guard);
      const to = Math.min(c1, L - guard);
      const envelope = slidingMax(acc, half, from - r0, Math.max(from, to) - r0);
      for (let i = from; i < to; i++) {
        const j = i - r0;
        const env = envelope[i - from]!;
        const a = acc[j]!;
        peak = Math.max(peak, a);
        if (env > limit) {
          if (open < 0) {
            open = i;
            tOpen = t[j]!;
            spanPeak = 0;
          }
          spanPeak = Math.max(spanPeak, a);
        } else if (open >= 0) {
          spans.push({ startS: tOpen, endS: t[j]!, durationS: t[j]! - tOpen, peakRadS2: spanPeak });
          open = -1;
        }
        // The trace's bucket maxima (envelopeMax of traces.ts over the inner samples).
        const inner = i - guard;
        if (inner % per === 0 || a > bestV) {
          bestV = a;
          bestT = t[j]!;
        }
        if (inner % per === per - 1 || i === L - guard - 1) {
          pieceT.push(round(bestT, 3));
          pieceV.push(round(bestV, 1));
        }
        tLastInner = t[j]!;
      }
    }
    if (trace.timeS.length > 0) {
      trace.timeS.push(pieceT[0]!);
      trace.radS2.push(null);
    }
    trace.timeS.push(...pieceT);
    trace.radS2.push(...pieceV);
    if (open >= 0)
      spans.push({
        startS: tOpen,
        endS: tLastInner,
        durationS: tLastInner - tOpen,
        peakRadS2: spanPeak,
      });
  });
  return rattleResult({ ...order, peak, idleS, limit, spans, trace });
}
