/**
 * The analysis result: one JSON document shared by the CLI, the server and the API, described
 * field by field in docs/signal-computation.md. Field names carry their units; amplitudes are
 * 0-peak angular-velocity amplitudes in rpm. zod 4's z.number() refuses NaN and ±Infinity, so a
 * result that parses is plain finite JSON.
 */
import { z } from "zod";

const segmentKind = z.enum(["start", "idle", "steady", "run-up", "coast-down"]);

export const analysisSettingsSchema = z.object({
  cylinders: z.int().positive(),
  stroke: z.union([z.literal(2), z.literal(4)]),
  firingOrder: z.number().positive(),
  /** Finest angle grid used (samples per revolution; the slowest blocks), and the coarsest. */
  samplesPerRev: z.int().positive(),
  samplesPerRevMin: z.int().positive(),
  /** True when the caller fixed the grid; otherwise each block gets the S its slowest speed needs. */
  samplesPerRevFixed: z.boolean(),
  revsPerBlock: z.int().positive(),
  overlap: z.number().min(0).lt(1),
  binRpm: z.number().positive(),
  rattleLimitRadS2: z.number().positive(),
  /** Orders per block bin: 1/revsPerBlock. */
  orderResolution: z.number().positive(),
  /** Highest order kept in curves and the order map. */
  topOrder: z.number().positive(),
  /** Anti-alias low-pass applied before resampling, Hz; null when the file's rate needed none. */
  lowPassHz: z.number().positive().nullable(),
  /** Blocks dipping below this engine speed are dropped (no alias-free grid for them), rpm. */
  minValidRpm: z.number().nonnegative(),
  window: z.literal("hann-periodic"),
  /**
   * What each block lost before the window: "linear" (a window-weighted least-squares line, so a
   * run-up's speed trend stays out of the low orders). Absent in results stored before it
   * existed: those removed only the block mean ("mean"). Optional rather than defaulted so code
   * that builds a result by hand still type-checks.
   */
  detrend: z.enum(["mean", "linear"]).optional(),
});

export const analysisResultSchema = z.object({
  firingOrder: z.number().positive(),
  sampleRateHz: z.number().positive(),
  durationS: z.number().nonnegative(),
  settings: analysisSettingsSchema,
  blocks: z.int().nonnegative(),
  isolation: z.array(
    z.object({
      rpm: z.number(),
      dB: z.number(),
      blocks: z.int().positive(),
      aboveNoise: z.boolean(),
    }),
  ),
  orderCurves: z.array(
    z.object({
      order: z.number().positive(),
      points: z.array(
        z.object({
          rpm: z.number(),
          crankRpm: z.number().nonnegative(),
          gearboxRpm: z.number().nonnegative(),
          blocks: z.int().positive(),
        }),
      ),
    }),
  ),
  orderMap: z.object({
    orderStep: z.number().positive(),
    orderCount: z.int().nonnegative(),
    blocksPerRow: z.int().positive(),
    blockRpm: z.array(z.number()),
    timeS: z.array(z.number()),
    crankRpm: z.array(z.array(z.number().nonnegative())),
    gearboxRpm: z.array(z.array(z.number().nonnegative())),
  }),
  segments: z.array(
    z.object({
      kind: segmentKind,
      startS: z.number(),
      endS: z.number(),
      meanRpm: z.number().nonnegative(),
    }),
  ),
  idle: z
    .object({
      meanRpm: z.number().nonnegative(),
      gearboxAngAccelRadS2: z.number().nonnegative(),
      gearboxAngAccelPeakRadS2: z.number().nonnegative(),
      limitRadS2: z.number().positive(),
      verdict: z.enum(["ok", "over-limit"]),
      idleDurationS: z.number().nonnegative(),
      blocks: z.int().nonnegative(),
      spans: z.array(
        z.object({
          startS: z.number(),
          endS: z.number(),
          durationS: z.number().nonnegative(),
          peakRadS2: z.number().nonnegative(),
        }),
      ),
      /**
       * |α(t)| at the gearbox input for the chart, bucket maxima; a null value separates two
       * segments. Null in results stored before the trace existed.
       */
      accelTrace: z
        .object({
          timeS: z.array(z.number()),
          radS2: z.array(z.number().nonnegative().nullable()),
        })
        .nullable()
        .default(null),
    })
    .nullable(),
  resonance: z.object({ rpm: z.number().positive(), isolationDb: z.number() }).nullable(),
  model: z
    .object({
      naturalFrequencyHz: z.number().positive(),
      dampingRatio: z.number().positive(),
      /** ωn as engine speed at the firing order, rpm. */
      resonanceRpm: z.number().positive(),
      rmsErrorDb: z.number().nonnegative(),
      bins: z.int().positive(),
    })
    .nullable(),
  timeSpectrum: z
    .object({
      segmentKind: segmentKind,
      startS: z.number(),
      endS: z.number(),
      meanRpm: z.number().nonnegative(),
      frequencyResolutionHz: z.number().positive(),
      frames: z.int().positive(),
      frequencyHz: z.array(z.number().nonnegative()),
      crankRpm: z.array(z.number().nonnegative()),
      gearboxRpm: z.array(z.number().nonnegative()),
    })
    .nullable(),
  /**
   * Bucket means of both speeds over the whole log for the speed trace (traces.ts). Null in
   * results stored before the trace existed (re-analysing adds it).
   */
  speedTrace: z
    .object({
      timeS: z.array(z.number()),
      /** A null value separates two sections of a log split at a gap (nothing drawn across it). */
      crankRpm: z.array(z.number().nullable()),
      gearboxRpm: z.array(z.number().nullable()),
      samplesPerPoint: z.int().positive(),
    })
    .nullable()
    .default(null),
  warnings: z.array(z.object({ code: z.string(), message: z.string() })),
  /**
   * Where the numbers came from (issue 14): the file's format, the channels read, the file's own
   * metadata, every repair made to the samples and the sections analysed. Absent in results
   * stored before it existed.
   */
  source: z
    .object({
      format: z.enum(["csv", "mdf4"]),
      channels: z.object({ time: z.string(), crank: z.string(), gearbox: z.string() }),
      units: z.object({ time: z.string(), crank: z.string(), gearbox: z.string() }),
      metadata: z.array(z.object({ key: z.string(), value: z.string() })),
      repairs: z.array(
        z.object({
          code: z.string(),
          message: z.string(),
          count: z.int().nonnegative(),
          rows: z.array(z.object({ from: z.int(), to: z.int() })),
          fromS: z.number(),
          toS: z.number(),
        }),
      ),
      /** Stretches analysed separately (a gap too long to repair lies between two), s. */
      sections: z.array(
        z.object({ startS: z.number(), endS: z.number(), samples: z.int().positive() }),
      ),
    })
    .optional(),
});

export type AnalysisResult = z.infer<typeof analysisResultSchema>;
export type AnalysisSettings = z.infer<typeof analysisSettingsSchema>;
