/**
 * The first pass of the bounded-memory analysis (analyse-samples.ts): one read of the source
 * in windows, gathering what the batch analysis (analyse.ts) reads from the whole arrays before
 * it tracks: the first non-finite sample, the strided samples of the top-speed quantile, and per
 * stretch (section, or the whole log) the crank-angle checkpoints and total (section-reader.ts),
 * the 0.1 s frame sums of the operating segments (segments.ts) and the speed trace's buckets
 * (traces.ts). Every sum is taken in the batch run's order, so the figures are the same.
 */
import { quantileStride } from "../analysis-assembly.ts";
import { RPM_PER_RAD_S } from "../firing-order.ts";
import { round } from "../order-curves.ts";
import type { SampleSource } from "../sample-source.ts";
import { SEGMENT_FRAME_S } from "../segments.ts";
import type { SpeedTrace } from "../traces.ts";
import { angleStep } from "../angle-grid.ts";
import { CHECK_EVERY, type Stretch } from "./section-reader.ts";

/** What the first pass keeps of one stretch. */
export interface StretchScan extends Stretch {
  t0: number;
  tEnd: number;
  checkpoints: Float64Array;
  totalAngle: number;
  /** Sum and count of crank speed (rad/s) per segment frame. */
  frameSum: Float64Array;
  frameCount: Float64Array;
  trace: SpeedTrace;
}

export interface Scan {
  /** Index of the first sample with a non-finite value, or −1. */
  firstBad: number;
  /** Crank speed of every quantileStride-th sample, rad/s. */
  strided: number[];
  stretches: StretchScan[];
}

class StretchState {
  readonly out: StretchScan;
  private angle = 0;
  private prevT = 0;
  private prevC = 0;
  private f = 0;
  private edge: number;
  private frames: number;
  private per: number;
  private bucket = { t: 0, c: 0, g: 0, k: 0 };
  constructor(s: Stretch, t0: number, tEnd: number, tracePoints: number) {
    const n = s.endIndex - s.startIndex;
    this.frames = Math.max(1, Math.ceil((tEnd - t0) / SEGMENT_FRAME_S));
    this.edge = t0 + SEGMENT_FRAME_S;
    this.per = Math.max(1, Math.ceil(n / tracePoints));
    this.out = {
      ...s,
      t0,
      tEnd,
      checkpoints: new Float64Array(Math.ceil(n / CHECK_EVERY)),
      totalAngle: 0,
      frameSum: new Float64Array(this.frames),
      frameCount: new Float64Array(this.frames),
      trace: { timeS: [], crankRpm: [], gearboxRpm: [], samplesPerPoint: this.per },
    };
  }

  /** Sample i of the stretch (relative index). */
  add(i: number, t: number, c: number, g: number): void {
    const o = this.out;
    if (i > 0) this.angle = angleStep(this.angle, this.prevC, c, this.prevT, t);
    if (i % CHECK_EVERY === 0) o.checkpoints[i / CHECK_EVERY] = this.angle;
    this.prevT = t;
    this.prevC = c;
    // Segment frames exactly as findSegments assigns them.
    while (t >= this.edge && this.f < this.frames - 1) {
      this.f++;
      this.edge = o.t0 + (this.f + 1) * SEGMENT_FRAME_S;
    }
    o.frameSum[this.f] = o.frameSum[this.f]! + c;
    o.frameCount[this.f] = o.frameCount[this.f]! + 1;
    // Speed-trace buckets of `per` consecutive samples, as speedTrace takes them.
    const b = this.bucket;
    b.t += t;
    b.c += c;
    b.g += g;
    b.k++;
    if (b.k === this.per) this.flush();
  }

  private flush(): void {
    const b = this.bucket;
    if (b.k === 0) return;
    const tr = this.out.trace;
    tr.timeS.push(round(b.t / b.k, 3));
    tr.crankRpm.push(round((b.c / b.k) * RPM_PER_RAD_S, 1));
    tr.gearboxRpm.push(round((b.g / b.k) * RPM_PER_RAD_S, 1));
    this.bucket = { t: 0, c: 0, g: 0, k: 0 };
  }

  finish(): StretchScan {
    this.flush();
    this.out.totalAngle = this.angle;
    return this.out;
  }
}

/**
 * Reads the source once in windows of `windowSamples`. `stretches` are the sections (or the
 * whole log) and `tracePoints` the speed trace's points for each (as sectionSpeedTrace gives).
 */
export function scanSource(
  source: SampleSource,
  stretches: readonly Stretch[],
  tracePoints: readonly number[],
  windowSamples: number,
): Scan {
  const n = source.length;
  const stride = quantileStride(n);
  const strided: number[] = [];
  let firstBad = -1;
  const states = stretches.map((s, k) => {
    const first = source.read(s.startIndex, s.startIndex + 1).timeS[0] ?? 0;
    const last = source.read(s.endIndex - 1, s.endIndex).timeS[0] ?? 0;
    return new StretchState(s, first, last, tracePoints[k]!);
  });
  for (let w0 = 0; w0 < n; w0 += windowSamples) {
    const w = source.read(w0, Math.min(n, w0 + windowSamples));
    const { timeS: t, crankRadS: c, gearboxRadS: g } = w;
    for (let j = 0; j < t.length; j++) {
      const i = w0 + j;
      // x − x is NaN exactly for NaN and ±Infinity.
      if (firstBad < 0 && (t[j]! - t[j]! !== 0 || c[j]! - c[j]! !== 0 || g[j]! - g[j]! !== 0))
        firstBad = i;
      if (i % stride === 0) strided.push(c[j]!);
    }
    stretches.forEach((s, k) => {
      const a = Math.max(s.startIndex, w0);
      const b = Math.min(s.endIndex, w0 + t.length);
      const st = states[k]!;
      for (let i = a; i < b; i++) st.add(i - s.startIndex, t[i - w0]!, c[i - w0]!, g[i - w0]!);
    });
  }
  return { firstBad, strided, stretches: states.map((s) => s.finish()) };
}
