/**
 * The transients of one stretch (analyseTransients, transient-analysis.ts) without the stretch
 * in memory, for the bounded-memory analysis (analyse-samples.ts). The fast spans come from the
 * FAST_FRAME_S frames of findFastSpans (transient.ts), computed by four forward cursors over
 * the stretch (the frame means, the frame's middle sample, and the crank angle half a block
 * before and after it: each moves only forward, so every index found is the batch search's).
 * Each span is then measured, its events read and its adaptive blocks cut on one window around
 * it, SPAN_PAD_S wider than the span on each side: more than any pad the batch code reads
 * around a span (3 s of order-filter margin, 8 s of drift high-pass for the event twist, 0.5 s
 * for the acceleration and the adaptive blocks, 1/0.3 Hz = 3.3 s for the filter's settling), so
 * the window reproduces the stretch wherever these look. docs/signal-computation.md,
 * "Bounded-memory analysis".
 */
import type { AnalysisSetup } from "../analysis-assembly.ts";
import { transientEvents } from "../events.ts";
import { RPM_PER_RAD_S } from "../firing-order.ts";
import { measureSpan } from "../span-measure.ts";
import { spanBlocks, type TransientPart } from "../transient-analysis.ts";
import { addMeasure } from "../transient-curves.ts";
import {
  FAST_FRAME_S,
  MAX_SPEED_CHANGE_PER_BLOCK,
  spansFromFrames,
  STANDSTILL_RPM,
  type FastSpan,
} from "../transient.ts";
import { ForwardCursor, type StretchReader } from "./section-reader.ts";

/** Samples read beyond each end of a span, in seconds of the sampling rate (see top). */
export const SPAN_PAD_S = 10;

/** findFastSpans over the stretch behind `reader`, by forward cursors of `size` samples. */
export function fastSpans(
  reader: StretchReader,
  t0: number,
  tEnd: number,
  revsPerBlock: number,
  idleRpm: number | null,
  size: number,
): FastSpan[] {
  const n = reader.length;
  if (n < 4) return [];
  const halfRad = Math.PI * revsPerBlock;
  const frames = Math.max(1, Math.floor((tEnd - t0) / FAST_FRAME_S));
  const rpm = new Float64Array(frames);
  const fast = new Uint8Array(frames);
  const at = new Int32Array(frames + 1);
  const atTime = new Float64Array(frames);
  const mid = new ForwardCursor(reader, size);
  const fm = new ForwardCursor(reader, size);
  const back = new ForwardCursor(reader, size);
  const ahead = new ForwardCursor(reader, size);
  const aLast = reader.totalAngle;
  // timeAtAngle of transient.ts with a forward-only search (the angles asked for only grow).
  const timeAtAngle = (c: ForwardCursor, theta: number, from: number) => {
    if (theta <= 0) return { t: t0, theta: 0, i: from };
    if (theta >= aLast) return { t: tEnd, theta: aLast, i: from };
    let i = from;
    while (c.angle(i + 1) <= theta) i++;
    const a0 = c.angle(i);
    const span = c.angle(i + 1) - a0;
    const u = span > 0 ? (theta - a0) / span : 0;
    const ti = c.t(i);
    return { t: ti + u * (c.t(i + 1) - ti), theta, i };
  };
  let i = 0;
  let k = 0; // frame-mean cursor
  let iA = 0;
  let iB = 0;
  for (let f = 0; f < frames; f++) {
    // Frame mean from the angle turned (frameMeans of transient.ts).
    const start = k;
    const tStart = fm.t(start);
    const aStart = fm.angle(start);
    const end = t0 + (f + 1) * FAST_FRAME_S;
    while (k < n - 1 && fm.t(k + 1) <= end) k++;
    const dtm = fm.t(k) - tStart;
    const frameRpm = dtm > 0 ? ((fm.angle(k) - aStart) / dtm) * RPM_PER_RAD_S : 0;
    const t = t0 + (f + 0.5) * FAST_FRAME_S;
    while (i < n - 2 && mid.t(i + 1) <= t) i++;
    at[f] = i;
    const ti = mid.t(i);
    atTime[f] = ti;
    const th = mid.angle(i);
    const a = timeAtAngle(back, th - halfRad, iA);
    const b = timeAtAngle(ahead, th + halfRad, iB);
    iA = a.i;
    iB = b.i;
    const toRpm = (dTheta: number, dt: number) => (dt > 0 ? (dTheta / dt) * RPM_PER_RAD_S : NaN);
    let n1 = toRpm(th - a.theta, ti - a.t);
    let n2 = toRpm(b.theta - th, b.t - ti);
    if (Number.isNaN(n1)) n1 = n2;
    if (Number.isNaN(n2)) n2 = n1;
    const mean = toRpm(b.theta - a.theta, b.t - a.t);
    rpm[f] = Number.isFinite(mean) ? mean : 0;
    fast[f] =
      frameRpm >= STANDSTILL_RPM && 2 * Math.abs(n2 - n1) > MAX_SPEED_CHANGE_PER_BLOCK * rpm[f]!
        ? 1
        : 0;
  }
  at[frames] = n;
  const timeAt = (index: number) => {
    if (index === 0) return t0;
    if (index >= n - 1) return tEnd;
    // A span's ends are frame middles: at[] ascends, so a binary search finds the frame.
    let lo = 0;
    let hi = frames - 1;
    while (lo < hi) {
      const m = (lo + hi) >> 1;
      if (at[m]! < index) lo = m + 1;
      else hi = m;
    }
    return at[lo] === index ? atTime[lo]! : mid.t(index);
  };
  return spansFromFrames({ rpm, fast, at, n, timeAt, idleRpm });
}

/** analyseTransients for one stretch: its spans measured on windows around them (see top). */
export function stretchTransients(
  reader: StretchReader,
  spans: readonly FastSpan[],
  setup: AnalysisSetup,
  out: TransientPart,
): void {
  const { fs, filters, grid } = setup;
  const q = setup.o.firingOrder;
  const pad = Math.ceil(SPAN_PAD_S * fs) + 8;
  for (const span of spans) {
    const w = reader.window(span.startIndex - pad, span.endIndex + pad);
    const local = {
      ...span,
      startIndex: span.startIndex - w.start,
      endIndex: span.endIndex - w.start,
    };
    const { timeS, angleRad, crankRadS, gearboxRadS } = w;
    const m = measureSpan({
      timeS,
      angleRad,
      crankRadS,
      gearboxRadS,
      sampleRateHz: fs,
      order: q,
      span: local,
    });
    out.events.push(
      ...transientEvents({
        timeS,
        crankRadS,
        gearboxRadS,
        sampleRateHz: fs,
        order: q,
        measures: [m],
      }),
    );
    out.blocks.push(
      ...spanBlocks(w, local, {
        sampleRateHz: fs,
        filters,
        grid,
        order: q,
        revsPerBlock: setup.o.revsPerBlock,
      }),
    );
    out.spans.push(span);
    addMeasure(out.bins, m, q, setup.o.binRpm);
  }
}
