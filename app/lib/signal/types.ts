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
  };
}
