/**
 * The analysis of a log split into sections (DriveLog.sections: stretches separated by a gap or
 * dropout too long to repair, ingest-repairs.ts). Nothing is computed across a gap: each section
 * is low-passed, integrated to crank angle and order-tracked on its own (analyse.ts), and the
 * blocks of all sections are merged, so no block spans a gap; operating segments are found per
 * section; the speed trace's buckets stay inside a section, with a null point between two
 * sections so a chart does not draw across the gap (result-schema.ts). Units: s, rad/s, rad.
 */
import { integrateAngle, type AngleGrid } from "./angle-grid.ts";
import { filtfilt, type Biquad } from "./lowpass.ts";
import { trackBlocks, type TrackedBlocks } from "./order-tracking.ts";
import { findSegments, type Segment } from "./segments.ts";
import { speedTrace, TRACE_POINTS, type SpeedTrace } from "./traces.ts";
import type { DriveLog, LogSection } from "./types.ts";

/** The log's sections, or one covering it all when it has none. */
export function sectionsOf(log: DriveLog): LogSection[] {
  const n = log.timeS.length;
  return log.sections && log.sections.length > 0
    ? log.sections
    : [{ startIndex: 0, endIndex: n, startS: log.timeS[0] ?? 0, endS: log.timeS[n - 1] ?? 0 }];
}

/**
 * Order-tracks each section on its own (low-pass, crank angle, blocks) and merges the blocks.
 * A section shorter than one block (R revolutions) is left out and listed in `skipped`.
 * `tracked` is null when no section holds a block's worth of revolutions.
 */
export function trackSections(
  log: DriveLog,
  filters: readonly Biquad[],
  args: {
    grid: AngleGrid;
    revsPerBlock: number;
    overlap: number;
    topBin: number;
    /** Firing-order bin for the block twist (order-tracking.ts); absent: no twist. */
    firingBin?: number;
  },
  onProgress?: (fraction: number) => void,
): { tracked: TrackedBlocks | null; skipped: LogSection[] } {
  const parts = sectionsOf(log);
  const pieces: TrackedBlocks[] = [];
  const skipped: LogSection[] = [];
  parts.forEach((s, k) => {
    const t = log.timeS.subarray(s.startIndex, s.endIndex);
    const c = log.crankRadS.subarray(s.startIndex, s.endIndex);
    const g = log.gearboxRadS.subarray(s.startIndex, s.endIndex);
    const angle = integrateAngle(t, c);
    if (t.length < 2 || angle[t.length - 1]! < 2 * Math.PI * args.revsPerBlock) {
      skipped.push(s);
      return;
    }
    pieces.push(
      trackBlocks({
        timeS: t,
        angleRad: angle,
        crankRadS: filters.length ? filtfilt(c, filters) : c,
        gearboxRadS: filters.length ? filtfilt(g, filters) : g,
        ...args,
        onProgress: (f) => onProgress?.((k + f) / parts.length),
      }),
    );
  });
  return { tracked: pieces.length ? mergeTracked(pieces, pieces[0]!) : null, skipped };
}

/** One TrackedBlocks from the blocks of each section, in time order. */
export function mergeTracked(parts: TrackedBlocks[], template: TrackedBlocks): TrackedBlocks {
  if (parts.length === 1) return parts[0]!;
  const bins = template.binsPerBlock;
  const count = parts.reduce((s, p) => s + p.blockCount, 0);
  const out: TrackedBlocks = {
    ...template,
    blockCount: count,
    blockRadS: new Float64Array(count),
    blockStartS: new Float64Array(count),
    blockEndS: new Float64Array(count),
    crankAmp: new Float64Array(count * bins),
    gearboxAmp: new Float64Array(count * bins),
    twistRadS: template.twistRadS ? new Float64Array(count) : undefined,
    droppedSlowBlocks: 0,
    samplesPerRevRange: [0, 0],
  };
  let at = 0;
  let lo = Infinity;
  let hi = 0;
  for (const p of parts) {
    out.blockRadS.set(p.blockRadS, at);
    out.blockStartS.set(p.blockStartS, at);
    out.blockEndS.set(p.blockEndS, at);
    out.crankAmp.set(p.crankAmp, at * bins);
    out.gearboxAmp.set(p.gearboxAmp, at * bins);
    if (out.twistRadS && p.twistRadS) out.twistRadS.set(p.twistRadS, at);
    out.droppedSlowBlocks += p.droppedSlowBlocks;
    if (p.blockCount > 0) {
      lo = Math.min(lo, p.samplesPerRevRange[0]);
      hi = Math.max(hi, p.samplesPerRevRange[1]);
    }
    at += p.blockCount;
  }
  out.samplesPerRevRange = count > 0 ? [lo, hi] : [0, 0];
  return out;
}

/** Operating segments of each section, one after the other (none spans a gap). */
export function sectionSegments(log: DriveLog): Segment[] {
  const parts = sectionsOf(log);
  if (parts.length === 1) return findSegments(log.timeS, log.crankRadS);
  return parts.flatMap((s) =>
    findSegments(
      log.timeS.subarray(s.startIndex, s.endIndex),
      log.crankRadS.subarray(s.startIndex, s.endIndex),
    ),
  );
}

/** The speed trace, bucketed per section, a null point in the middle of each gap. */
export function sectionSpeedTrace(log: DriveLog): SpeedTrace {
  const parts = sectionsOf(log);
  const { timeS, crankRadS, gearboxRadS } = log;
  if (parts.length === 1) return speedTrace(timeS, crankRadS, gearboxRadS);
  const n = timeS.length;
  return joinTraces(
    parts,
    parts.map(({ startIndex: a, endIndex: b }) =>
      speedTrace(
        timeS.subarray(a, b),
        crankRadS.subarray(a, b),
        gearboxRadS.subarray(a, b),
        Math.max(1, Math.floor((TRACE_POINTS * (b - a)) / n)),
      ),
    ),
  );
}

/** The sections' speed traces (pieces[k] of parts[k]) as one, a null point in each gap. */
export function joinTraces(
  parts: readonly LogSection[],
  pieces: readonly SpeedTrace[],
): SpeedTrace {
  if (parts.length === 1) return pieces[0]!;
  const out: SpeedTrace = { timeS: [], crankRpm: [], gearboxRpm: [], samplesPerPoint: 1 };
  parts.forEach((s, k) => {
    const piece = pieces[k]!;
    if (k > 0) {
      const prev = parts[k - 1]!;
      out.timeS.push(Math.round(((prev.endS + s.startS) / 2) * 1000) / 1000);
      out.crankRpm.push(null);
      out.gearboxRpm.push(null);
    }
    out.timeS.push(...piece.timeS);
    out.crankRpm.push(...piece.crankRpm);
    out.gearboxRpm.push(...piece.gearboxRpm);
    out.samplesPerPoint = Math.max(out.samplesPerPoint, piece.samplesPerPoint);
  });
  return out;
}

/** Warnings for the sections too short to order-track (the first five named, the rest counted). */
export function skippedWarnings(
  skipped: LogSection[],
  revsPerBlock: number,
): { code: string; message: string }[] {
  const s3 = (x: number) => Math.round(x * 1000) / 1000;
  const out = skipped.slice(0, 5).map((s) => ({
    code: "section_skipped",
    message: `the section from ${s3(s.startS)} s to ${s3(s.endS)} s holds fewer than ${revsPerBlock} crank revolutions (one analysis block) between its gaps and is not order-tracked`,
  }));
  if (skipped.length > 5)
    out.push({
      code: "section_skipped",
      message: `${skipped.length - 5} more sections are too short for one analysis block and are not order-tracked`,
    });
  return out;
}
