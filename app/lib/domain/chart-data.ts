/**
 * The JSON behind one drive log's charts (drive-log page, rattle check, share links), built from
 * the stored analysis result. Columnar arrays, values exactly as the result JSON has them (so a
 * chart's CSV export matches the API's result), except the order map, whose time-ordered rows
 * are re-binned by engine speed for the "engine speed × order" view. Kept well under 300 KB for
 * any log: every series is already decimated by the signal core (traces.ts, orderMap rows).
 *
 * Units: engine speed rpm; amplitudes 0-peak angular-velocity amplitude in rpm; isolation dB;
 * time s; angular acceleration rad/s². Conversions for display are in chart-units.ts.
 */
import type { AnalysisResult, TransientEvent } from "../signal/result-schema";
import { modelIsolationDb } from "../signal/two-mass-model";

export type SegmentKind = AnalysisResult["segments"][number]["kind"];
/** How an engine-speed bin was measured: computed order tracking, or the Vold–Kalman filter. */
export type MeasureMethod = "blocks" | "filter";

export interface ChartData {
  firingOrder: number;
  durationS: number;
  sampleRateHz: number;
  revsPerBlock: number;
  binRpm: number;
  /** Null for analyses stored before the trace existed: re-analyse to draw it. */
  speedTrace: AnalysisResult["speedTrace"];
  segments: AnalysisResult["segments"];
  /** Every tracked order's curve; `firingOrder` is one of them. */
  orderCurves: { order: number; rpm: number[]; crankRpm: number[]; gearboxRpm: number[] }[];
  /**
   * `modelDb`: the fitted two-mass model's predicted isolation at the same engine speeds, dB
   * (−20·log10 T(r), two-mass-model.ts); null when no model was fitted.
   */
  isolation: {
    rpm: number[];
    dB: number[];
    aboveNoise: boolean[];
    modelDb: number[] | null;
    /** Per point; "blocks" for results stored before the order filter existed. */
    method: MeasureMethod[];
  };
  resonance: AnalysisResult["resonance"];
  model: AnalysisResult["model"];
  /**
   * Engine speed × order: rows are engine-speed bins (centre `rpm[i]`, width `rowRpm`),
   * columns orders 0, orderStep, 2·orderStep, …; cells power-averaged amplitude, rpm.
   */
  orderMap: {
    orderStep: number;
    orderCount: number;
    rowRpm: number;
    rpm: number[];
    crankRpm: number[][];
    gearboxRpm: number[][];
  };
  /**
   * Time × order, for logs that stay near one speed (idle, start): rows are consecutive groups
   * of the result's order-map rows (mid time `timeS[i]`, mean engine speed `rowEngineRpm[i]`).
   */
  orderMapByTime: {
    timeS: number[];
    rowEngineRpm: number[];
    crankRpm: number[][];
    gearboxRpm: number[][];
  };
  /** Null without an idle segment. */
  idle: null | {
    meanRpm: number;
    limitRadS2: number;
    verdict: "ok" | "over-limit";
    gearboxAngAccelRadS2: number;
    gearboxAngAccelPeakRadS2: number;
    idleDurationS: number;
    spans: { startS: number; endS: number; durationS: number; peakRadS2: number }[];
    accelTrace: { timeS: number[]; radS2: (number | null)[] } | null;
    /** Firing-order amplitude over time in the idle segments, both sides, rpm (0-peak). */
    firingOrderTrace: { timeS: number[]; crankRpm: number[]; gearboxRpm: number[] };
  };
  warnings: AnalysisResult["warnings"];
  /** Engine starts and stops; null for results stored before events were found. */
  events: TransientEvent[] | null;
  /** Firing-order twist amplitude (0-peak, degrees) against engine speed; null without one. */
  twist: null | {
    rpm: number[];
    deg: number[];
    blocks: number[];
    method: MeasureMethod[];
    driftCutoffHz: number;
  };
  /** What the order filter measured (its spans, settings, lowest resolved speed); null before it. */
  transient: null | Omit<NonNullable<AnalysisResult["transient"]>, "blocks">;
}

/** At most this many engine-speed rows in the order map. */
export const MAP_ROWS = 120;

/** Three significant digits: plenty for a colour, and a third of the bytes. */
function sig3(x: number): number {
  return x === 0 ? 0 : Number(x.toPrecision(3));
}

/** Row width for the order map: the result's bin width, widened so there are ≤ MAP_ROWS rows. */
function mapRowRpm(rpm: number[], binRpm: number): number {
  if (rpm.length === 0) return binRpm;
  const span = Math.max(...rpm) - Math.min(...rpm);
  let width = binRpm;
  while (span / width + 1 > MAP_ROWS) width += binRpm;
  return width;
}

export function chartData(result: AnalysisResult): ChartData {
  const map = result.orderMap;
  const rowRpm = mapRowRpm(map.blockRpm, result.settings.binRpm);
  const rows = new Map<number, { c: Float64Array; g: Float64Array; n: number }>();
  map.blockRpm.forEach((rpm, i) => {
    const key = Math.round(rpm / rowRpm);
    let row = rows.get(key);
    if (!row) {
      row = { c: new Float64Array(map.orderCount), g: new Float64Array(map.orderCount), n: 0 };
      rows.set(key, row);
    }
    // Rows are themselves power averages of blocksPerRow blocks: weight them equally.
    for (let k = 0; k < map.orderCount; k++) {
      row.c[k] = row.c[k]! + (map.crankRpm[i]![k] ?? 0) ** 2;
      row.g[k] = row.g[k]! + (map.gearboxRpm[i]![k] ?? 0) ** 2;
    }
    row.n += 1;
  });
  const keys = [...rows.keys()].sort((a, b) => a - b);
  const rms = (v: Float64Array, n: number) => Array.from(v, (s) => sig3(Math.sqrt(s / n)));

  const per = Math.max(1, Math.ceil(map.timeS.length / MAP_ROWS));
  const byTime: ChartData["orderMapByTime"] = {
    timeS: [],
    rowEngineRpm: [],
    crankRpm: [],
    gearboxRpm: [],
  };
  for (let start = 0; start < map.timeS.length; start += per) {
    const end = Math.min(map.timeS.length, start + per);
    const c = new Float64Array(map.orderCount);
    const g = new Float64Array(map.orderCount);
    let rpm = 0;
    for (let i = start; i < end; i++) {
      rpm += map.blockRpm[i]!;
      for (let k = 0; k < map.orderCount; k++) {
        c[k] = c[k]! + (map.crankRpm[i]![k] ?? 0) ** 2;
        g[k] = g[k]! + (map.gearboxRpm[i]![k] ?? 0) ** 2;
      }
    }
    const n = end - start;
    byTime.timeS.push(Math.round(((map.timeS[start]! + map.timeS[end - 1]!) / 2) * 1000) / 1000);
    byTime.rowEngineRpm.push(Math.round((rpm / n) * 10) / 10);
    byTime.crankRpm.push(rms(c, n));
    byTime.gearboxRpm.push(rms(g, n));
  }

  let idle: ChartData["idle"] = null;
  if (result.idle) {
    const idleSegments = result.segments.filter((s) => s.kind === "idle");
    const k = Math.round(result.firingOrder / map.orderStep);
    const trace = { timeS: [] as number[], crankRpm: [] as number[], gearboxRpm: [] as number[] };
    map.timeS.forEach((t, i) => {
      if (!idleSegments.some((s) => t >= s.startS && t <= s.endS)) return;
      trace.timeS.push(t);
      trace.crankRpm.push(map.crankRpm[i]![k] ?? 0);
      trace.gearboxRpm.push(map.gearboxRpm[i]![k] ?? 0);
    });
    const { blocks: _, ...rest } = result.idle;
    idle = { ...rest, firingOrderTrace: trace };
  }

  return {
    firingOrder: result.firingOrder,
    durationS: result.durationS,
    sampleRateHz: result.sampleRateHz,
    revsPerBlock: result.settings.revsPerBlock,
    binRpm: result.settings.binRpm,
    speedTrace: result.speedTrace,
    segments: result.segments,
    orderCurves: result.orderCurves.map((c) => ({
      order: c.order,
      rpm: c.points.map((p) => p.rpm),
      crankRpm: c.points.map((p) => p.crankRpm),
      gearboxRpm: c.points.map((p) => p.gearboxRpm),
    })),
    isolation: {
      rpm: result.isolation.map((p) => p.rpm),
      dB: result.isolation.map((p) => p.dB),
      aboveNoise: result.isolation.map((p) => p.aboveNoise),
      method: result.isolation.map((p) => p.method ?? "blocks"),
      modelDb: result.model
        ? result.isolation.map(
            (p) =>
              Math.round(
                modelIsolationDb(
                  p.rpm,
                  result.firingOrder,
                  result.model!.naturalFrequencyHz,
                  result.model!.dampingRatio,
                ) * 100,
              ) / 100,
          )
        : null,
    },
    resonance: result.resonance,
    model: result.model,
    orderMap: {
      orderStep: map.orderStep,
      orderCount: map.orderCount,
      rowRpm,
      rpm: keys.map((key) => key * rowRpm),
      crankRpm: keys.map((key) => rms(rows.get(key)!.c, rows.get(key)!.n)),
      gearboxRpm: keys.map((key) => rms(rows.get(key)!.g, rows.get(key)!.n)),
    },
    orderMapByTime: byTime,
    idle,
    warnings: result.warnings,
    ...transientCharts(result),
  };
}

/** The issue-15 fields: events, twist curve, filter spans (the per-block list stays in the result). */
function transientCharts(
  result: AnalysisResult,
): Pick<ChartData, "events" | "twist" | "transient"> {
  const twist = result.twist ?? null;
  const transient = result.transient ?? null;
  return {
    events: result.events ?? null,
    twist: twist && {
      rpm: twist.curve.map((p) => p.rpm),
      deg: twist.curve.map((p) => p.deg),
      blocks: twist.curve.map((p) => p.blocks),
      method: twist.curve.map((p) => p.method),
      driftCutoffHz: twist.driftCutoffHz,
    },
    transient: transient && {
      slewThresholdRpmS: transient.slewThresholdRpmS,
      filter: transient.filter,
      spans: transient.spans,
      lowestResolvedRpm: transient.lowestResolvedRpm,
      unresolvedReason: transient.unresolvedReason,
    },
  };
}

/**
 * Where the isolation curve stops: the lowest engine speed at which the firing order was
 * resolved and why it stops there; null when the result does not say (or the log goes no lower).
 */
export function unresolvedBelow(
  transient: ChartData["transient"],
): { rpm: number; reason: string } | null {
  if (!transient || transient.lowestResolvedRpm === null || !transient.unresolvedReason)
    return null;
  return { rpm: transient.lowestResolvedRpm, reason: transient.unresolvedReason };
}

/** An event comes "within 10 %" of the damper's travel limit (issue 15): margin ≤ 10 % of it. */
export const END_STOP_WARNING_SHARE = 0.1;

/**
 * The end-stop margin of one start or stop: travel limit − the event's peak-to-peak twist, in
 * degrees. The whole peak-to-peak swing is taken from one side because the speed sensors cannot
 * show where the rest position lies (the static twist under load is removed with the drift), so
 * the margin is on the safe side. `warn` when the margin is at most 10 % of the limit (or gone).
 */
export function endStopMargin(
  twistPeakToPeakDeg: number,
  travelLimitDeg: number,
): { marginDeg: number; warn: boolean } {
  const marginDeg = travelLimitDeg - twistPeakToPeakDeg;
  return { marginDeg, warn: marginDeg <= END_STOP_WARNING_SHARE * travelLimitDeg };
}

/**
 * The names of the events, the same in the table, on the speed trace and in text alternatives:
 * "Start" and "Stop", numbered in time order ("Start 2") when a log holds more than one of a kind.
 */
export function eventNames(events: readonly { kind: "start" | "stop" }[]): string[] {
  const total = { start: 0, stop: 0 };
  for (const e of events) total[e.kind] += 1;
  const seen = { start: 0, stop: 0 };
  return events.map((e) => {
    seen[e.kind] += 1;
    const name = e.kind === "start" ? "Start" : "Stop";
    return total[e.kind] > 1 ? `${name} ${seen[e.kind]}` : name;
  });
}
