/**
 * Types shared by the parts of the signal core. Units are in the names:
 * time in seconds, angular velocity in rad/s, engine speed in rpm.
 */

/** A problem found in the input, as a value (never thrown to the user). */
export interface SignalIssue {
  /** Stable machine-readable code, e.g. "time_not_increasing". */
  code: string;
  /** One sentence a technician understands, naming the bad value. */
  message: string;
  /** 1-based row number in the file (the header is row 1), when there is one. */
  row?: number;
  /** Column name as written in the header, when there is one. */
  column?: string;
}

export type Outcome<T> =
  | { ok: true; value: T; warnings: SignalIssue[] }
  | { ok: false; error: SignalIssue; warnings: SignalIssue[] };

export type SpeedUnit = "rpm" | "rad/s" | "deg/s" | "rev/s";
export type TimeUnit = "s" | "ms";

/** The file formats a drive log is read from, recognised by content (format.ts). */
export type SourceFormat = "csv" | "mdf4";

/** The three channels the analysis needs. */
export type ChannelRole = "time" | "crank" | "gearbox";

/**
 * A team's own name for one of its loggers' channels (a team setting): applied before the
 * built-in recognition. Names match case- and space-insensitively.
 */
export interface ChannelName {
  name: string;
  role: ChannelRole;
  /** The unit the channel is written in, when the file does not say. */
  unit?: SpeedUnit | TimeUnit;
}

/** One channel of a file, as the channel picker and `GET /api/v1/logs/:logId/channels` show it. */
export interface ChannelInfo {
  name: string;
  /** Unit as the file states it (header, units row, MDF4 channel or conversion), or null. */
  unit: string | null;
  /** MDF4 channel group (its acquisition name or "group N"); null for CSV. */
  group: string | null;
  /** Mean sampling rate of the channel's time base in Hz, null when it cannot be told. */
  sampleRateHz: number | null;
  samples: number;
  /** Range of the finite values (after conversion), null when there is none. */
  min: number | null;
  max: number | null;
  /** The role recognition gives it (team names first, then built-in), or null. */
  role: ChannelRole | null;
}

/** One line of a file's preamble (CSV) or header comment / properties (MDF4), kept as written. */
export interface SourceMetadataEntry {
  key: string;
  value: string;
}

/** A repair made to the samples, listed on the page and in the result JSON (`source.repairs`). */
export interface LogRepair {
  /** "dropout_filled" | "missing_rows_filled" | "jitter_resampled" */
  code: string;
  /** One sentence, as the warning shows it. */
  message: string;
  /** How many samples (cells or rows) were filled or moved. */
  count: number;
  /** File rows (CSV, 1-based, header = 1) or record numbers (MDF4, 1-based) it touched, as ranges; at most 50. */
  rows: { from: number; to: number }[];
  /** Time span it touched, s from the file's time zero. */
  fromS: number;
  toS: number;
}

/** A stretch of the log with no gap longer than the repair limit; analysed on its own. */
export interface LogSection {
  /** Sample indices into the DriveLog arrays, end exclusive. */
  startIndex: number;
  endIndex: number;
  startS: number;
  endS: number;
}

/** A drive log after ingest: uniform arrays, SI units. */
export interface DriveLog {
  /** Sample times in s, strictly increasing, starting where the file starts. */
  timeS: Float64Array;
  /** Crank-side angular velocity in rad/s (the order-tracking reference). */
  crankRadS: Float64Array;
  /** Gearbox-input angular velocity in rad/s. */
  gearboxRadS: Float64Array;
  /** Other numeric columns, kept for display, by header name (NaN where empty or not numeric). */
  extra: Record<string, Float64Array>;
  /** Mean sampling rate in Hz. */
  sampleRateHz: number;
  /**
   * Stretches separated by gaps too long to repair (always at least one when set). No
   * order-tracking block spans two sections. Absent: the whole log is one section.
   */
  sections?: LogSection[];
  /** What ingest decided, so every figure can be traced to the file. */
  source: {
    rows: number;
    delimiter: string;
    decimal: "." | ",";
    timeColumn: string;
    crankColumn: string;
    gearboxColumn: string;
    timeUnit: TimeUnit;
    crankUnit: SpeedUnit;
    gearboxUnit: SpeedUnit;
    /** Absent on logs built by hand (tests): read as "csv", no metadata, no repairs. */
    format?: SourceFormat;
    metadata?: SourceMetadataEntry[];
    repairs?: LogRepair[];
  };
}
