/**
 * The analysis of a drive log whose samples sit behind a SampleSource (sample-source.ts), in
 * memory that does not grow with the log (issue 17): the same result as analyseDriveLog
 * (analyse.ts) for the same samples, read only through `source.read` in windows. Memory is one
 * window (`windowSamples`, plus the filter margins, plus the longest block, fast span or
 * spectrum frame) and what the result itself is built from (the blocks' spectra, the frames of
 * the segments and fast spans, the trace buckets). How each stage is windowed, and why it
 * equals the batch run: docs/signal-computation.md, "Bounded-memory analysis".
 */
import { isPositive } from "./analyse.ts";
import { resolveOptions, type AnalysisOptions } from "./analysis-options.ts";
import {
  fail,
  finishAnalysis,
  quantileOf,
  setupAnalysis,
  type OnProgress,
} from "./analysis-assembly.ts";
import type { AnalysisResult } from "./result-schema.ts";
import type { SampleSource } from "./sample-source.ts";
import { joinTraces, skippedWarnings } from "./section-analysis.ts";
import { frameRpm, segmentsFromFrames, type Segment } from "./segments.ts";
import { sourceBlock } from "./source-block.ts";
import { spectrumOfRange } from "./time-spectrum.ts";
import { TRACE_POINTS } from "./traces.ts";
import { emptyTransientPart, idleOf, transientResultOf } from "./transient-analysis.ts";
import type { LogSection, Outcome } from "./types.ts";
import { indexAtTime, rattleWindows } from "./stream/rattle-windows.ts";
import { scanSource, type StretchScan } from "./stream/scan.ts";
import { StretchReader } from "./stream/section-reader.ts";
import { blocksIn } from "./order-tracking.ts";
import { BlockStore, trackStretch } from "./stream/track-windows.ts";
import { fastSpans, stretchTransients } from "./stream/transient-windows.ts";

/** Samples per window unless the caller tunes it (about 2 MB of the three channels). */
export const DEFAULT_WINDOW_SAMPLES = 1 << 16;

const readerOf = (source: SampleSource, s: StretchScan) =>
  new StretchReader(source, s, s.checkpoints, s.totalAngle);

/**
 * analyseDriveLog for the samples behind `source` (same options, progress stages and result;
 * errors as values). `tuning.windowSamples` sets the window (tests use small ones so window
 * edges fall inside blocks, spans and segments).
 */
export function analyseSamples(
  source: SampleSource,
  options: AnalysisOptions = {},
  onProgress?: OnProgress,
  tuning: { windowSamples?: number } = {},
): Outcome<AnalysisResult> {
  const W = Math.max(64, Math.floor(tuning.windowSamples ?? DEFAULT_WINDOW_SAMPLES));
  const resolved = resolveOptions(options);
  if (!resolved.ok) return fail("invalid_option", resolved.message);
  const o = resolved.value;
  const n = source.length;
  if (n < 2)
    return fail(
      "no_data",
      "the drive log has fewer than two samples or channels of different lengths",
    );
  const fs = source.sampleRateHz;
  if (!isPositive(fs))
    return fail("bad_sample_rate", `the sampling rate must be positive, got ${fs}`);
  const tFirst = source.read(0, 1).timeS[0]!;
  const tLast = source.read(n - 1, n).timeS[0]!;
  const whole: LogSection = { startIndex: 0, endIndex: n, startS: tFirst, endS: tLast };
  const sections = source.sections && source.sections.length > 0 ? source.sections : [whole];
  // As analyse.ts: blocks, segments and trace per section only when there are two or more.
  const multi = sections.length >= 2;
  const main = multi ? sections : [whole];
  const points = main.map((s) =>
    multi
      ? Math.max(1, Math.floor((TRACE_POINTS * (s.endIndex - s.startIndex)) / n))
      : TRACE_POINTS,
  );
  // The transients go by sectionsOf, which differs only for a single section short of the log.
  const oneShort = !multi && (sections[0]!.startIndex !== 0 || sections[0]!.endIndex !== n);
  const scan = scanSource(source, oneShort ? [...main, sections[0]!] : main, [...points, 1], W);
  if (scan.firstBad >= 0)
    return fail(
      "non_finite_value",
      `a speed or time value is not a finite number at sample ${scan.firstBad + 1}`,
    );
  onProgress?.("track", 0);
  const ready = setupAnalysis(o, fs, quantileOf(scan.strided, 0.999), options.samplesPerRev);
  if (!ready.ok) return ready.outcome;
  const { setup } = ready;
  const { warnings } = setup;
  const R = o.revsPerBlock;
  const mainScans = scan.stretches.slice(0, main.length);
  onProgress?.("track", 1);

  const store = new BlockStore(
    setup,
    mainScans.reduce((k, s) => k + blocksIn(s.totalAngle, R, o.overlap), 0),
  );
  const skipped: LogSection[] = [];
  let tracked = 0;
  mainScans.forEach((s, k) => {
    const len = s.endIndex - s.startIndex;
    if (multi && (len < 2 || s.totalAngle < 2 * Math.PI * R)) {
      skipped.push(main[k]!);
      return;
    }
    trackStretch(readerOf(source, s), setup, store, W, (f) =>
      onProgress?.("spectra", (k + f) / main.length),
    );
    tracked++;
  });
  if (multi) {
    warnings.push(...skippedWarnings(skipped, R));
    if (tracked === 0)
      return fail(
        "too_few_revolutions",
        `no section of the log holds ${R} crank revolutions (one analysis block) between its gaps`,
        warnings,
      );
  }
  onProgress?.("spectra", 1);
  const segments: Segment[] = mainScans.flatMap((s) =>
    s.endIndex - s.startIndex < 2
      ? []
      : segmentsFromFrames(frameRpm(s.frameSum, s.frameCount), s.t0, s.tEnd),
  );
  const transientScans = oneShort ? scan.stretches.slice(main.length) : mainScans;

  return finishAnalysis(
    setup,
    store.finish(),
    {
      segments,
      durationS: tLast - tFirst,
      transients: (t) => {
        if (!o.transients) return null;
        const part = emptyTransientPart();
        const idleRpm = idleOf(segments);
        for (const s of transientScans) {
          const reader = readerOf(source, s);
          if (reader.length < 4) continue;
          const spans = fastSpans(reader, s.t0, s.tEnd, R, idleRpm, W);
          stretchTransients(reader, spans, setup, part);
        }
        return transientResultOf(part, {
          tracked: t,
          order: o.firingOrder,
          revsPerBlock: R,
          binRpm: o.binRpm,
          sampleRateHz: fs,
          inPlace: true,
        });
      },
      rattle: (t) =>
        rattleWindows({
          source,
          sampleRateHz: fs,
          tracked: t,
          segments,
          firingOrder: o.firingOrder,
          limitRadS2: o.rattleLimitRadS2,
          windowSamples: W,
        }),
      spectrum: (segment) =>
        spectrumOfRange({
          frameAt: (a, b) => {
            const w = source.read(a, b);
            return [w.crankRadS, w.gearboxRadS];
          },
          i0: indexAtTime(source, segment.startS),
          i1: indexAtTime(source, segment.endS),
          sampleRateHz: fs,
          segment,
          topOrder: o.topOrder,
        }),
      speedTrace: () =>
        joinTraces(
          main,
          mainScans.map((s) => s.trace),
        ),
      source: () => sourceBlock(source.source, sections),
    },
    onProgress,
  );
}
