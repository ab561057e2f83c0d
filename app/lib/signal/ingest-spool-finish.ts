/**
 * The last step of the spooled ingest (ingest-samples.ts; docs/signal-ingest.md, "Spooled
 * ingest"): finishLog's checks and repairs for a log whose samples are in temporary files.
 * While the samples are written, RunningFigures folds them into what the checks read: the stats
 * pass (ingest-checks.ts logStats, the same additions in the same order), the first 200 times
 * (timeQuantum), the first and last time, and where each channel first stays at its running
 * maximum (the clipping check). After the last sample the nominal interval is read from the
 * file (at most 4001 intervals). A log with nothing to repair is then finished from these
 * figures alone; any other log (dropouts, gaps, jitter, a strict refusal) is read back whole,
 * finished by finishLog as the batch ingest does, and its repaired samples spooled again.
 */
import {
  allFinite,
  factWarnings,
  nominalIntervalOf,
  samplingOff,
  startStats,
  statsPiece,
  type Stats,
} from "./ingest-checks.ts";
import { finishLog, type FinishOptions } from "./ingest-finish.ts";
import { jitterFloor, nothingToRepair, timeQuantum } from "./ingest-repairs.ts";
import type { SampleSource } from "./sample-source.ts";
import { SampleSpool } from "./sample-spool.ts";
import type { DriveLog, Outcome } from "./types.ts";

/** Where a channel first stays at its running maximum for `need` samples (firstRunAt, online). */
class RunTracker {
  max = -Infinity;
  run = 0;
  start = -1;
  found = -1;
  constructor(readonly need: number) {}
  add(x: Float64Array, from: number, to: number, index0: number): void {
    let { max, run, start, found } = this;
    const need = this.need;
    for (let i = from; i < to; i++) {
      const v = x[i]!;
      const at = index0 + i;
      if (at === 0 || v > max) {
        max = v;
        run = 1;
        start = at;
        found = need === 1 ? at : -1;
      } else if (v === max) {
        if (++run === 1) start = at;
        if (run === need && found < 0) found = start;
      } else run = 0;
    }
    Object.assign(this, { max, run, start, found });
  }
}

/** The figures finishLog reads, folded in as the samples are written. */
export class RunningFigures {
  n = 0;
  st: Stats = startStats(undefined, NaN);
  readonly first = new Float64Array(200);
  t0 = NaN;
  tLast = NaN;
  readonly clip: [RunTracker, RunTracker];
  constructor(options: FinishOptions) {
    const need = options.clipRunSamples ?? 10;
    this.clip = [new RunTracker(need), new RunTracker(need)];
  }
  /** Samples [from, to) are new; sample from − 1 is the previous one when from ≥ 1. */
  add(t: Float64Array, c: Float64Array, g: Float64Array, from: number, to: number): void {
    if (to <= from) return;
    const n0 = this.n - from; // the log index of array index 0
    let f = from;
    if (this.n === 0) {
      this.st = startStats(c[from]!, g[from]!);
      this.t0 = t[from]!;
      f = from + 1;
    }
    statsPiece(t, c, g, Math.max(1, f), to, this.st);
    for (let i = from; i < to && n0 + i < 200; i++) this.first[n0 + i] = t[i]!;
    this.clip[0].add(c, from, to, n0);
    this.clip[1].add(g, from, to, n0);
    this.tLast = t[to - 1]!;
    this.n += to - from;
  }
}

/**
 * finishLog for the spooled log (method at the top). `source` is the DriveLog's source as built
 * before the checks; `rowOf` maps a sample to its file row or record. The spool is consumed:
 * it becomes the SampleSource, or is removed on a refusal.
 */
export function finishSpooled(
  spool: SampleSpool,
  fig: RunningFigures,
  source: DriveLog["source"],
  rowOf: (i: number) => number,
  options: FinishOptions,
): Outcome<SampleSource> {
  spool.flush();
  const n = spool.length;
  const st = fig.st;
  const sampleRateHz = n > 1 ? (n - 1) / (fig.tLast - fig.t0) : 0;
  const interval = (i: number) => {
    const w = spool.readChannel(0, i - 1, i + 1);
    return w[1]! - w[0]!;
  };
  const nom = n >= 3 ? nominalIntervalOf(n, interval) : 0;
  const clean = options.strict
    ? allFinite(st) && !samplingOff(n, nom, options, st)
    : nothingToRepair(
        n,
        nom,
        jitterFloor(n, nom, n >= 3 ? timeQuantum(fig.first.subarray(0, Math.min(n, 200))) : 0),
        st,
      );
  if (clean && fig.clip[0].need >= 1) {
    const facts = {
      n,
      durationS: n > 1 ? fig.tLast - fig.t0 : 0,
      sampleRateHz,
      crankColumn: source.crankColumn,
      gearboxColumn: source.gearboxColumn,
      runAt: (ch: 0 | 1, max: number) => (fig.clip[ch].max === max ? fig.clip[ch].found : -1),
    };
    const warnings = factWarnings(facts, rowOf, options, st);
    return { ok: true, value: spool.toSource({ sampleRateHz, source }), warnings };
  }
  // Repairs or a refusal: the batch finish over the whole log, read back from the spool.
  const log: DriveLog = {
    timeS: spool.readChannel(0, 0, n),
    crankRadS: spool.readChannel(1, 0, n),
    gearboxRadS: spool.readChannel(2, 0, n),
    extra: {},
    sampleRateHz,
    source,
  };
  spool.discard();
  const finished = finishLog(log, rowOf, options);
  if (!finished.ok) return finished;
  return { ...finished, value: spoolLog(finished.value) };
}

/** A SampleSource over a DriveLog's samples written to a fresh spool (its extra columns dropped). */
export function spoolLog(log: DriveLog): SampleSource {
  const { timeS, crankRadS, gearboxRadS, extra: _extra, ...meta } = log;
  const spool = new SampleSpool();
  try {
    spool.append(0, timeS, 0, timeS.length);
    spool.append(1, crankRadS, 0, crankRadS.length);
    spool.append(2, gearboxRadS, 0, gearboxRadS.length);
    return spool.toSource(meta);
  } catch (e) {
    spool.discard();
    throw e;
  }
}
