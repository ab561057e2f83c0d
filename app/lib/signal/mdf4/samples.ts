/**
 * An MDF4 file → a SampleSource for the spooled ingest (ingest-samples.ts; docs/signal-ingest.md,
 * "Spooled ingest"), the same log ingestModel (ingest.ts) builds, without holding it: when the
 * crank and gearbox channels share the crank's group (one time base), the records are read once
 * (records.ts) and each piece of values is converted to s and rad/s, checked (time increasing,
 * speeds plausible: the same tests and messages as ingestModel) and written to the spool with
 * the running figures; finishSpooled then finishes it as finishLog would. Two time bases (the
 * gearbox interpolated onto the crank's times) and a channel picked twice go through
 * ingestModel and have their samples spooled afterwards.
 */
import type { IngestOptions } from "../ingest.ts";
import { finishSpooled, RunningFigures, spoolLog } from "../ingest-spool-finish.ts";
import type { SampleSource } from "../sample-source.ts";
import { SampleSpool } from "../sample-spool.ts";
import type { Outcome, SignalIssue } from "../types.ts";
import { RAD_S_PER_UNIT, S_PER_UNIT } from "../units.ts";
import { channelRefs, chooseChannels } from "./choose.ts";
import { dataPieces } from "./data.ts";
import type { MdfFile } from "./file.ts";
import { withModel } from "./index.ts";
import { checkSpeeds, firstOutside, ingestModel, notesWarning, notIncreasingAt } from "./ingest.ts";
import { readRecords } from "./records.ts";
import type { MdfModel } from "./structure.ts";

/** The drive log in the MDF4 file at `path` as a SampleSource (options as ingestMdf4File). */
export async function ingestMdf4Samples(
  path: string,
  options: IngestOptions = {},
  onProgress?: (fraction: number) => void,
): Promise<Outcome<SampleSource>> {
  return withModel(path, (file, model) => samplesOfModel(file, model, options, onProgress));
}

/** A growing scratch copy of one piece of a channel (the reader reuses its array). */
class Piece {
  v: Float64Array = new Float64Array(4096);
  n = 0;
  keep = (values: Float64Array, n: number): void => {
    if (this.v.length < n) this.v = new Float64Array(n);
    this.v.set(values.subarray(0, n));
    this.n = n;
  };
}

async function samplesOfModel(
  file: MdfFile,
  model: MdfModel,
  options: IngestOptions,
  onProgress?: (fraction: number) => void,
): Promise<Outcome<SampleSource>> {
  const chosen = chooseChannels(channelRefs(model), options);
  const c = chosen.ok ? chosen.value : undefined;
  const oneBase =
    c &&
    c.gearbox.group === c.crank.group &&
    new Set([c.time, c.crank, c.gearbox].map((r) => r.channel)).size === 3;
  if (!c || !oneBase) {
    const r = await ingestModel(file, model, options, onProgress);
    return r.ok ? { ...r, value: spoolLog(r.value) } : r;
  }
  const warnings = [...notesWarning(model.notes), ...c.warnings];
  const dg = c.time.dg;
  const { total } = await dataPieces(file, dg.data, `DG block at offset ${dg.offset}`);
  const [pt, pc, pg] = [new Piece(), new Piece(), new Piece()];
  const toS = S_PER_UNIT[c.timeUnit];
  const radC = RAD_S_PER_UNIT[c.crankUnit];
  const radG = RAD_S_PER_UNIT[c.gearboxUnit];
  const lo = ((options.minRpm ?? -20) * 2 * Math.PI) / 60;
  const hi = ((options.maxRpm ?? 12000) * 2 * Math.PI) / 60;
  const spool = new SampleSpool();
  const fig = new RunningFigures(options);
  let n = 0;
  let prevT = NaN;
  let timeProblem: SignalIssue | undefined;
  const bad: [number, number][] = [
    [-1, NaN],
    [-1, NaN],
  ]; // the first implausible crank and gearbox speed: index and value
  // Converted and checked as ingestModel does (toS, scaleInPlace, firstNotIncreasing,
  // checkSpeeds), one piece at a time; the piece's index 0 is the previous sample after the first.
  const t = new Piece();
  const cr = new Piece();
  const gb = new Piece();
  function piece(values: Float64Array, count: number): void {
    pg.keep(values, count);
    const k = count;
    const at = n > 0 ? 1 : 0;
    for (const p of [t, cr, gb]) if (p.v.length < k + 1) p.v = grow(p.v, k + 1);
    for (let i = 0; i < k; i++) {
      t.v[at + i] = c!.timeUnit === "s" ? pt.v[i]! : pt.v[i]! * toS;
      cr.v[at + i] = radC !== 1 ? pc.v[i]! * radC : pc.v[i]!;
      gb.v[at + i] = radG !== 1 ? pg.v[i]! * radG : pg.v[i]!;
    }
    for (let i = at; i < at + k && !timeProblem; i++) {
      const prev = i > 0 ? t.v[i - 1]! : prevT;
      if (n + i - at > 0 && !(t.v[i]! > prev))
        timeProblem = notIncreasingAt(c!.time, prev, t.v[i]!, n + i - at);
    }
    for (const [ch, x] of [
      [0, cr],
      [1, gb],
    ] as const) {
      if (bad[ch]![0] >= 0) continue;
      const j = firstOutside(x.v.subarray(at, at + k), lo, hi);
      if (j >= 0) bad[ch] = [n + j, x.v[at + j]!];
    }
    spool.append(0, t.v, at, at + k);
    spool.append(1, cr.v, at, at + k);
    spool.append(2, gb.v, at, at + k);
    fig.add(t.v, cr.v, gb.v, at, at + k);
    n += k;
    prevT = t.v[at + k - 1]!;
    t.v[0] = prevT;
    cr.v[0] = cr.v[at + k - 1]!;
    gb.v[0] = gb.v[at + k - 1]!;
  }
  try {
    const wants = [
      { group: c.time.group, channel: c.time.channel, sink: pt.keep },
      { group: c.crank.group, channel: c.crank.channel, sink: pc.keep },
      { group: c.gearbox.group, channel: c.gearbox.channel, sink: piece },
    ];
    await readRecords(file, dg, wants, (done) =>
      onProgress?.(total > 0 ? Math.min(1, done / total) : 1),
    );
    const fail = (error: SignalIssue): Outcome<SampleSource> => {
      spool.discard();
      return { ok: false, error, warnings };
    };
    if (timeProblem) return fail(timeProblem);
    const refs = [c.crank, c.gearbox] as const;
    for (const ch of [0, 1] as const) {
      const [i, v] = bad[ch]!;
      if (i < 0) continue;
      const one = checkSpeeds([[Float64Array.of(v), refs[ch]]], options, () => i + 1);
      if (one) return fail(one);
    }
    const metadata = [...model.metadata];
    for (const r of [c.time, c.crank, c.gearbox])
      if (r.channel.comment)
        metadata.push({ key: `comment of ${r.display}`, value: r.channel.comment });
    const source = {
      rows: n,
      delimiter: "",
      decimal: "." as const,
      timeColumn: c.time.display,
      crankColumn: c.crank.display,
      gearboxColumn: c.gearbox.display,
      timeUnit: c.timeUnit,
      crankUnit: c.crankUnit,
      gearboxUnit: c.gearboxUnit,
      format: "mdf4" as const,
      metadata,
      repairs: [],
    };
    const finished = finishSpooled(spool, fig, source, (i) => i + 1, options);
    return { ...finished, warnings: [...warnings, ...finished.warnings] };
  } catch (e) {
    spool.discard();
    throw e; // withModel words it
  }
}

function grow(v: Float64Array, n: number): Float64Array {
  const out = new Float64Array(n + 4096);
  out[0] = v[0]!;
  return out;
}
