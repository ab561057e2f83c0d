/**
 * Windows of one stretch of a SampleSource (a section, or the whole log) with the crank angle
 * of each sample, for the bounded-memory analysis (analyse-samples.ts; docs/signal-computation.md,
 * "Bounded-memory analysis"). The angle is integrated like integrateAngle (angle-grid.ts) from
 * the stretch's first sample; the first pass (scan.ts) keeps it at every CHECK_EVERY-th sample,
 * so a window anywhere is integrated from the checkpoint before it with the very same additions
 * in the same order as the batch run, and its angles are bit-identical.
 */
import { angleStep } from "../angle-grid.ts";
import type { SampleSource } from "../sample-source.ts";

/** Every how many samples of a stretch the first pass keeps the crank angle. */
export const CHECK_EVERY = 16384;

/** A stretch [startIndex, endIndex) of the source's samples. */
export interface Stretch {
  startIndex: number;
  endIndex: number;
}

/** Samples [start, start + length) of a stretch (indices relative to the stretch) and their angle, rad. */
export interface AngleWindow {
  start: number;
  timeS: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
  angleRad: Float64Array;
}

export class StretchReader {
  readonly length: number;
  constructor(
    readonly source: SampleSource,
    readonly stretch: Stretch,
    /** Angle at sample k·CHECK_EVERY of the stretch (scan.ts). */
    readonly checkpoints: Float64Array,
    /** Angle at the stretch's last sample. */
    readonly totalAngle: number,
  ) {
    this.length = stretch.endIndex - stretch.startIndex;
  }

  /** Samples [a, b) of the stretch (clamped) with their crank angle. */
  window(a: number, b: number): AngleWindow {
    const lo = Math.max(0, Math.min(this.length, a));
    const hi = Math.max(lo, Math.min(this.length, b));
    const k = Math.min(Math.floor(lo / CHECK_EVERY), this.checkpoints.length - 1);
    const from = Math.max(0, k) * CHECK_EVERY;
    const base = this.stretch.startIndex;
    const w = this.source.read(base + from, base + hi);
    const { timeS: t, crankRadS: c } = w;
    const skip = lo - from;
    const angle = new Float64Array(hi - lo);
    let theta = this.checkpoints[Math.max(0, k)] ?? 0;
    for (let i = 1; i <= skip; i++) theta = angleStep(theta, c[i - 1]!, c[i]!, t[i - 1]!, t[i]!);
    if (angle.length > 0) angle[0] = theta;
    for (let i = skip + 1; i < t.length; i++) {
      theta = angleStep(theta, c[i - 1]!, c[i]!, t[i - 1]!, t[i]!);
      angle[i - skip] = theta;
    }
    return {
      start: lo,
      timeS: t.subarray(skip),
      crankRadS: c.subarray(skip),
      gearboxRadS: w.gearboxRadS.subarray(skip),
      angleRad: angle,
    };
  }
}

/**
 * Forward reading of a stretch's time and angle one sample at a time (the frame loops of the
 * fast-span search): holds one window of `size` samples, read again when an index leaves it.
 */
export class ForwardCursor {
  private w: AngleWindow | null = null;
  private w0 = 0;
  private w1 = 0;
  constructor(
    private readonly reader: StretchReader,
    private readonly size: number,
  ) {}

  private load(i: number): void {
    this.w = this.reader.window(i, i + this.size);
    this.w0 = this.w.start;
    this.w1 = this.w.start + this.w.timeS.length;
  }

  t(i: number): number {
    if (i < this.w0 || i >= this.w1) this.load(i);
    return this.w!.timeS[i - this.w0]!;
  }

  angle(i: number): number {
    if (i < this.w0 || i >= this.w1) this.load(i);
    return this.w!.angleRad[i - this.w0]!;
  }
}
