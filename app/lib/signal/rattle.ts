/**
 * Rattle check in idle: gearbox-input angular acceleration against a limit (rad/s²).
 *
 * - Order amplitude: α = Δω·q·Ω (Δω 0-peak rad/s of the gearbox channel at the firing order q,
 *   power-averaged over the idle blocks; Ω their mean crank speed, rad/s).
 * - Time-domain peak: the gearbox speed is low-pass filtered (zero-phase 4th-order Butterworth
 *   at 2.5× the firing frequency, so the firing order and its lower neighbours pass and sensor
 *   noise does not), then differentiated by central differences; the peak is max |α(t)|,
 *   ignoring one firing period at each segment edge.
 * - Spans: where the envelope of |α(t)| (running max over one firing period) exceeds the limit.
 * Trace: |α(t)| decimated to at most TRACE_POINTS points by bucket maxima (traces.ts).
 * Verdict "over-limit" when either the order amplitude or the time-domain peak exceeds the limit.
 */
import { angularAccelerationRadS2 } from "./firing-order.ts";
import { butterworthLowpass4, filtfilt } from "./lowpass.ts";
import { ampIndex, type TrackedBlocks } from "./order-tracking.ts";
import { orderBin } from "./order-curves.ts";
import type { Segment } from "./segments.ts";
import { slidingMax } from "./sliding-max.ts";
import { envelopeMax, TRACE_POINTS } from "./traces.ts";

export interface RattleSpan {
  startS: number;
  endS: number;
  durationS: number;
  peakRadS2: number;
}

export interface RattleCheck {
  meanRpm: number;
  gearboxAngAccelRadS2: number;
  gearboxAngAccelPeakRadS2: number;
  limitRadS2: number;
  verdict: "ok" | "over-limit";
  /** Idle time examined, s, and the number of blocks in the order amplitude. */
  idleDurationS: number;
  blocks: number;
  spans: RattleSpan[];
  /**
   * |α(t)| of the gearbox input over the idle segments for the chart, rad/s², decimated keeping
   * each bucket's maximum; a null value separates two idle segments.
   */
  accelTrace: { timeS: number[]; radS2: (number | null)[] };
}

/** At most this many spans are listed (the longest are kept). */
export const MAX_SPANS = 200;

/** Index of the first sample at or after time t (timeS ascending). */
function indexAt(timeS: Float64Array, t: number): number {
  let lo = 0;
  let hi = timeS.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (timeS[mid]! < t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/**
 * The idle rattle check over the idle segments of a log (method at the top of this file;
 * docs/signal-computation.md, step 13).
 *
 * In: `timeS` in s and `gearboxRadS` (gearbox-input angular velocity) in rad/s, the log's
 * `sampleRateHz`, the order-tracked blocks (amplitudes 0-peak rad/s), the log's `segments`, the
 * `firingOrder` q in orders per crank revolution and the limit in rad/s² (the analysis default
 * is 500 rad/s², a typical design limit: Shock and Vibration 2022, art. 2954825).
 *
 * Out: null when the log has no idle segment or no block lies wholly inside one; else the mean
 * idle speed in rpm (0.1 rpm), the order amplitude α = Δω·q·Ω and the time-domain peak in
 * rad/s² (0.1), the idle time in s and blocks used, the spans over the limit (s, at most
 * MAX_SPANS, the longest kept), the |α(t)| trace for the chart, and the verdict. The verdict
 * reads a recording: it does not say that a vehicle is safe to drive or a damper to work on.
 */
export function rattleCheck(args: {
  timeS: Float64Array;
  gearboxRadS: Float64Array;
  sampleRateHz: number;
  tracked: TrackedBlocks;
  segments: readonly Segment[];
  firingOrder: number;
  limitRadS2: number;
}): RattleCheck | null {
  const { tracked, firingOrder: q, limitRadS2: limit } = args;
  const idle = args.segments.filter((s) => s.kind === "idle");
  const order = idleOrderAccel(tracked, idle, q);
  if (!order) return null;
  const { omega } = order;
  const firingHz = (omega / (2 * Math.PI)) * q;
  const cutoff = 2.5 * firingHz;
  const sections =
    cutoff < 0.45 * args.sampleRateHz ? butterworthLowpass4(cutoff, args.sampleRateHz) : [];
  const guard = Math.ceil(args.sampleRateHz / firingHz);
  let peak = 0;
  let idleS = 0;
  const spans: RattleSpan[] = [];
  const trace: RattleCheck["accelTrace"] = { timeS: [], radS2: [] };
  const idleSamples = idle.reduce(
    (n, s) => n + indexAt(args.timeS, s.endS) - indexAt(args.timeS, s.startS),
    0,
  );
  for (const seg of idle) {
    idleS += seg.endS - seg.startS;
    const i0 = indexAt(args.timeS, seg.startS);
    const i1 = indexAt(args.timeS, seg.endS);
    if (i1 - i0 < 4 * guard) continue;
    const x = args.gearboxRadS.subarray(i0, i1);
    const y = sections.length > 0 ? filtfilt(x, sections) : Float64Array.from(x);
    const t = args.timeS.subarray(i0, i1);
    const acc = new Float64Array(y.length);
    for (let i = 1; i < y.length - 1; i++)
      acc[i] = Math.abs((y[i + 1]! - y[i - 1]!) / (t[i + 1]! - t[i - 1]!));
    // Envelope: running max over one firing period, centred; edges (filter and difference) skipped.
    const half = Math.max(1, guard >> 1);
    let open = -1;
    let spanPeak = 0;
    const envelope = slidingMax(acc, half, guard, y.length - guard);
    for (let i = guard; i < y.length - guard; i++) {
      const env = envelope[i - guard]!;
      peak = Math.max(peak, acc[i]!);
      if (env > limit) {
        if (open < 0) {
          open = i;
          spanPeak = 0;
        }
        spanPeak = Math.max(spanPeak, acc[i]!);
      } else if (open >= 0) {
        spans.push({
          startS: t[open]!,
          endS: t[i]!,
          durationS: t[i]! - t[open]!,
          peakRadS2: spanPeak,
        });
        open = -1;
      }
    }
    const inner = {
      t: t.subarray(guard, y.length - guard),
      a: acc.subarray(guard, y.length - guard),
    };
    const piece = envelopeMax(
      inner.t,
      inner.a,
      Math.ceil((TRACE_POINTS * inner.t.length) / Math.max(1, idleSamples)),
    );
    if (trace.timeS.length > 0) {
      trace.timeS.push(piece.timeS[0]!);
      trace.radS2.push(null);
    }
    trace.timeS.push(...piece.timeS);
    trace.radS2.push(...piece.value);
    if (open >= 0) {
      const last = y.length - guard - 1;
      spans.push({
        startS: t[open]!,
        endS: t[last]!,
        durationS: t[last]! - t[open]!,
        peakRadS2: spanPeak,
      });
    }
  }
  return rattleResult({ ...order, peak, idleS, limit, spans, trace });
}

/**
 * The order part of the check over the `idle` segments: α = Δω·q·Ω from the blocks lying wholly
 * inside one (power-averaged gearbox amplitude at the firing order q, their mean crank speed Ω
 * in rad/s); null when there is none.
 */
export function idleOrderAccel(
  tracked: TrackedBlocks,
  idle: readonly Segment[],
  q: number,
): { omega: number; orderAlpha: number; nBlocks: number } | null {
  if (idle.length === 0) return null;
  const k = orderBin(q, tracked.revsPerBlock);
  let p = 0;
  let w = 0;
  let nBlocks = 0;
  for (let b = 0; b < tracked.blockCount; b++) {
    const a = tracked.blockStartS[b]!;
    const e = tracked.blockEndS[b]!;
    if (!idle.some((s) => a >= s.startS && e <= s.endS)) continue;
    const at = ampIndex(tracked, b, k);
    const amp = at >= 0 ? tracked.gearboxAmp[at]! : 0;
    p += amp * amp;
    w += tracked.blockRadS[b]!;
    nBlocks++;
  }
  if (nBlocks === 0) return null;
  const omega = w / nBlocks;
  return { omega, orderAlpha: angularAccelerationRadS2(Math.sqrt(p / nBlocks), q, omega), nBlocks };
}

/** The check from its parts: figures rounded, the longest MAX_SPANS spans kept, the verdict. */
export function rattleResult(r: {
  omega: number;
  orderAlpha: number;
  nBlocks: number;
  peak: number;
  idleS: number;
  limit: number;
  spans: RattleSpan[];
  trace: RattleCheck["accelTrace"];
}): RattleCheck {
  const { omega, orderAlpha, nBlocks, peak, idleS, limit, spans, trace } = r;
  const kept =
    spans.length > MAX_SPANS
      ? [...spans]
          .sort((a, b) => b.durationS - a.durationS)
          .slice(0, MAX_SPANS)
          .sort((a, b) => a.startS - b.startS)
      : spans;
  const r3 = (v: number) => Math.round(v * 1000) / 1000;
  return {
    meanRpm: Math.round(((omega * 60) / (2 * Math.PI)) * 10) / 10,
    gearboxAngAccelRadS2: Math.round(orderAlpha * 10) / 10,
    gearboxAngAccelPeakRadS2: Math.round(peak * 10) / 10,
    limitRadS2: limit,
    verdict: orderAlpha > limit || peak > limit ? "over-limit" : "ok",
    idleDurationS: r3(idleS),
    blocks: nBlocks,
    spans: kept.map((s) => ({
      startS: r3(s.startS),
      endS: r3(s.endS),
      durationS: r3(s.durationS),
      peakRadS2: Math.round(s.peakRadS2 * 10) / 10,
    })),
    accelTrace: trace,
  };
}
