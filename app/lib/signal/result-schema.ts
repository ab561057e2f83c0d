/**
 * The analysis result: one JSON document shared by the CLI, the server and the API, described
 * field by field in docs/signal-computation.md. Field names carry their units; amplitudes are
 * 0-peak angular-velocity amplitudes in rpm. zod 4's z.number() refuses NaN and ±Infinity, so a
 * result that parses is plain finite JSON.
 */
import { z } from "zod";

const segmentKind = z.enum(["start", "idle", "steady", "run-up", "coast-down"]);

/**
 * A long series of finite numbers: at least 0 where `nonnegative`, null allowed where `gaps`.
 * The same rule as z.array(z.number()…), checked in one loop: that costs a schema call per value,
 * and on a cold start of the command the order map and traces took about 60 ms of it.
 */
function series<Gaps extends boolean = false>(opts: { nonnegative?: boolean; gaps?: Gaps } = {}) {
  const min = opts.nonnegative ? 0 : -Infinity;
  const what = `an array of ${opts.nonnegative ? "non-negative " : ""}finite numbers${opts.gaps ? " or nulls" : ""}`;
  return z.custom<Gaps extends true ? (number | null)[] : number[]>(
    (v) => {
      if (!Array.isArray(v)) return false;
      for (const x of v)
        if (x === null ? !opts.gaps : !(typeof x === "number" && Number.isFinite(x) && x >= min))
          return false;
      return true;
    },
    { message: `expected ${what}` },
  );
}

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

/** One engine start or stop (events.ts). Speeds rpm, times s, angles degrees. */
export const transientEventSchema = z.object({
  kind: z.enum(["start", "stop"]),
  startS: z.number(),
  endS: z.number(),
  /** Engine speed of least isolation inside the event; null when the order was not resolved. */
  resonanceRpm: z.number().positive().nullable(),
  /** Largest amplification through the damper in the event, dB (−isolation, positive = amplified). */
  peakAmplificationDb: z.number().nullable(),
  /** Time the engine speed spent within ±10 % of resonanceRpm, s. */
  timeNearResonanceS: z.number().nonnegative().nullable(),
  /** Largest |dω/dt| of the gearbox input in the event, rad/s². */
  peakGearboxAngAccelRadS2: z.number().nonnegative(),
  /** Peak-to-peak relative angle primary − secondary in the event (drift removed), degrees. */
  twistPeakToPeakDeg: z.number().nonnegative(),
});

export const transientSchema = z.object({
  /** A segment whose engine speed changes faster than this is measured by the filter, rpm/s. */
  slewThresholdRpmS: z.number().positive(),
  /**
   * The slew rule is |dn/dt| > maxSpeedChangePerBlock · n² / (60 · revsPerBlock): speed-dependent;
   * slewThresholdRpmS is its value at this engine speed, rpm. Optional (added with the rule).
   */
  slewReferenceRpm: z.number().positive().optional(),
  /** Largest speed change within one fixed block before a span is fast, fraction (0.05). */
  maxSpeedChangePerBlock: z.number().positive().optional(),
  filter: z.object({
    method: z.literal("vold-kalman-2"),
    poles: z.int().min(1).max(3),
    /** Half-power bandwidth, one side of the order line, in orders (× shaft rate). */
    bandwidthOrders: z.number().positive(),
    /** Its floor when the shaft is slow, Hz. */
    minBandwidthHz: z.number().positive(),
  }),
  /** Stretches measured by the filter: engine starts, stops and fast run-ups or coast-downs. */
  spans: z.array(
    z.object({ kind: z.enum(["start", "stop", "fast"]), startS: z.number(), endS: z.number() }),
  ),
  /** Lowest engine speed at which the firing order was resolved (the isolation curve's low end), rpm. */
  lowestResolvedRpm: z.number().positive().nullable(),
  /** Why the curve stops there, one sentence; null when the log reaches no lower. */
  unresolvedReason: z.string().nullable(),
  /** Adaptive blocks over the filter's spans: fewer revolutions at low speed and high slew. */
  blocks: z.array(
    z.object({
      startS: z.number(),
      endS: z.number(),
      rpm: z.number().positive(),
      revs: z.number().positive(),
      /** 1/revs, orders. */
      orderResolution: z.number().positive(),
      /** Firing-order 0-peak amplitudes, rad/s. */
      crankRadS: z.number().nonnegative(),
      gearboxRadS: z.number().nonnegative(),
    }),
  ),
});

export const twistSchema = z.object({
  /** Firing-order twist amplitude (0-peak, degrees) per engine-speed bin. */
  curve: z.array(
    z.object({
      rpm: z.number(),
      deg: z.number().nonnegative(),
      blocks: z.int().positive(),
      method: z.enum(["blocks", "filter"]),
    }),
  ),
  /** How the slow drift of ∫(ω_crank − ω_gearbox)dt was removed: a zero-phase high-pass, Hz. */
  driftCutoffHz: z.number().positive(),
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
      /**
       * How the bin was measured: "blocks" (computed order tracking, fixed revolutions per block)
       * or "filter" (the Vold–Kalman order filter on start, stop and fast segments; `blocks` then
       * counts the filter's samples in the bin ÷ one block's worth). Absent before issue 15.
       */
      method: z.enum(["blocks", "filter"]).optional(),
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
    blockRpm: series(),
    timeS: series(),
    crankRpm: z.array(series({ nonnegative: true })),
    gearboxRpm: z.array(series({ nonnegative: true })),
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
          timeS: series(),
          radS2: series({ nonnegative: true, gaps: true }),
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
      frequencyHz: series({ nonnegative: true }),
      crankRpm: series({ nonnegative: true }),
      gearboxRpm: series({ nonnegative: true }),
    })
    .nullable(),
  /**
   * Bucket means of both speeds over the whole log for the speed trace (traces.ts). Null in
   * results stored before the trace existed (re-analysing adds it).
   */
  speedTrace: z
    .object({
      timeS: series(),
      /** A null value separates two sections of a log split at a gap (nothing drawn across it). */
      crankRpm: series({ gaps: true }),
      gearboxRpm: series({ gaps: true }),
      samplesPerPoint: z.int().positive(),
    })
    .nullable()
    .default(null),
  warnings: z.array(z.object({ code: z.string(), message: z.string() })),
  /**
   * Transients (issue 15): the segments the order filter measured instead of the blocks, the
   * filter's settings, and down to which engine speed the firing order could be resolved.
   * Absent in results stored before it existed.
   */
  transient: transientSchema.optional(),
  /** Engine starts and stops found in the log, with the damper's figures in each (issue 15). */
  events: z.array(transientEventSchema).optional(),
  /**
   * Twist between the damper's primary and secondary side (issue 15): the firing-order twist
   * amplitude against engine speed, and how the relative angle's drift was removed.
   */
  twist: twistSchema.nullable().optional(),
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
export type TransientEvent = z.infer<typeof transientEventSchema>;
export type TransientInfo = z.infer<typeof transientSchema>;
export type TwistBlock = z.infer<typeof twistSchema>;
