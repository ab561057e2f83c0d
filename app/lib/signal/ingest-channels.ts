/**
 * The channels of an ingest (ingest.ts, step 4): growing Float64Array columns for time, crank,
 * gearbox and every other column, the scales from the file's units to s and rad/s (and to rpm
 * for the plausibility limits), and the DriveLog built from them once the rows are read.
 */
import type { LogHeader } from "./ingest-header.ts";
import { Column } from "./ingest-scan.ts";
import type { DriveLog } from "./types.ts";
import { RAD_S_PER_UNIT, S_PER_UNIT } from "./units.ts";

export interface Channels {
  t: Column;
  crank: Column;
  gear: Column;
  /** One per ColumnMap.extra entry, values as written (NaN where a field is not a number). */
  extras: Column[];
  /** Time unit → s. */
  scaleT: number;
  /** Crank and gearbox unit → rad/s. */
  radC: number;
  radG: number;
  /** Crank and gearbox unit → rpm. */
  toRpmC: number;
  toRpmG: number;
}

/**
 * Columns sized from the first data line and the expected file size when there is a hint.
 * Numbers grow longer through a log, so this errs high, which costs no memory: pages of the
 * unused tail are never touched and never resident.
 */
export function createChannels(header: LogHeader, sizeHintBytes?: number): Channels {
  const { map } = header;
  const guessRows = sizeHintBytes
    ? Math.ceil((sizeHintBytes / Math.max(1, header.firstRowChars + 1)) * 1.05) + 16
    : 4096;
  const sized = sizeHintBytes !== undefined;
  const [t, crank, gear] = [0, 1, 2].map(() => new Column(guessRows, sized)) as [
    Column,
    Column,
    Column,
  ];
  const radC = RAD_S_PER_UNIT[map.crankUnit];
  const radG = RAD_S_PER_UNIT[map.gearboxUnit];
  return {
    t,
    crank,
    gear,
    extras: map.extra.map(() => new Column(guessRows, sized)),
    scaleT: S_PER_UNIT[map.timeUnit],
    radC,
    radG,
    toRpmC: radC / RAD_S_PER_UNIT.rpm,
    toRpmG: radG / RAD_S_PER_UNIT.rpm,
  };
}

/** The DriveLog of the first n rows; extra columns with no number at all are left out. */
export function buildDriveLog(ch: Channels, n: number, header: LogHeader): DriveLog {
  const m = header.map;
  const log: DriveLog = {
    timeS: ch.t.take(n),
    crankRadS: ch.crank.take(n),
    gearboxRadS: ch.gear.take(n),
    extra: {},
    sampleRateHz: n > 1 ? (n - 1) / ((ch.t.data[n - 1] ?? 0) - (ch.t.data[0] ?? 0)) : 0,
    source: csvSource(header, n),
  };
  m.extra.forEach((e, k) => {
    const values = (ch.extras[k] as Column).take(n);
    if (values.some((v) => !Number.isNaN(v))) log.extra[e.name] = values;
  });
  return log;
}

/** The DriveLog's source of a CSV log of n rows read with `header` (no repairs yet). */
export function csvSource(header: LogHeader, n: number): DriveLog["source"] {
  const { map: m, headers } = header;
  return {
    rows: n,
    delimiter: header.delimiter,
    decimal: header.decimal,
    timeColumn: headers[m.time] ?? "",
    crankColumn: headers[m.crank] ?? "",
    gearboxColumn: headers[m.gearbox] ?? "",
    timeUnit: m.timeUnit,
    crankUnit: m.crankUnit,
    gearboxUnit: m.gearboxUnit,
    format: "csv",
    metadata: header.metadata,
    repairs: [],
  };
}
