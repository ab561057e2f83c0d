/**
 * A drive log's samples behind a window reader, so an analysis never needs the whole log in
 * memory (issue 17: memory independent of log length). The batch DriveLog (types.ts) holds every
 * sample in three Float64Arrays; a SampleSource hands out any stretch [start, end) on request,
 * from memory (memorySource, for tests and small logs) or from a temporary file written while
 * the log was read (the spooled ingest). Units as DriveLog: s and rad/s.
 */
import type { DriveLog } from "./types.ts";

/** Samples [start, end) of the three channels; the arrays are the caller's to keep. */
export interface SampleWindow {
  timeS: Float64Array;
  crankRadS: Float64Array;
  gearboxRadS: Float64Array;
}

/** Everything of a DriveLog but its sample arrays, plus a window reader over them. */
export interface SampleSource extends Omit<
  DriveLog,
  "timeS" | "crankRadS" | "gearboxRadS" | "extra"
> {
  /** Number of samples. */
  readonly length: number;
  /** Samples [start, end) (clamped to 0…length), memory proportional to end − start. */
  read(start: number, end: number): SampleWindow;
  /** Releases what the source holds (a temporary file); reading afterwards throws. */
  close(): void;
}

/** A SampleSource over a DriveLog already in memory (windows are copies, like a file's). */
export function memorySource(log: DriveLog): SampleSource {
  const { timeS, crankRadS, gearboxRadS, extra: _extra, ...rest } = log;
  let open = true;
  return {
    ...rest,
    length: timeS.length,
    read(start, end) {
      if (!open) throw new Error("the sample source is closed");
      const a = Math.max(0, Math.min(timeS.length, start));
      const b = Math.max(a, Math.min(timeS.length, end));
      return {
        timeS: timeS.slice(a, b),
        crankRadS: crankRadS.slice(a, b),
        gearboxRadS: gearboxRadS.slice(a, b),
      };
    },
    close() {
      open = false;
    },
  };
}
