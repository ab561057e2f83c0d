/**
 * The sample rate a file's preamble states, to cross-check against its time column (ingest.ts
 * warns `stated_rate_mismatch` when they differ by more than STATED_RATE_TOLERANCE).
 *
 * Read forms (key matched ignoring case; number with a decimal point or comma):
 *   rate keys — "rate", "sample rate", "sampling rate", "sample frequency", "sampling frequency",
 *     "fs" — with Hz, kHz, MHz, S/s, 1/s or no unit (Hz): "Rate = 5 kHz", "Sample rate: 2000 Hz";
 *   interval keys — "interval", "sample interval", "sampling interval", "sample period",
 *     "sampling period", "time step", "dt" — with s, ms, µs/us, ns or no unit (s):
 *     "Sampling interval = 0.5 ms".
 * Keys about buses ("baud rate", "bit rate", "CAN rate") are not sample rates.
 */
import type { DriveLog, SignalIssue, SourceMetadataEntry } from "./types.ts";

/** Relative difference above which the stated and the measured rate disagree (1 %). */
export const STATED_RATE_TOLERANCE = 0.01;

const RATE_KEYS = new Set([
  "rate",
  "sample rate",
  "sampling rate",
  "sample frequency",
  "sampling frequency",
  "samplerate",
  "fs",
]);
const INTERVAL_KEYS = new Set([
  "interval",
  "sample interval",
  "sampling interval",
  "sample period",
  "sampling period",
  "time step",
  "dt",
]);
const HZ: Record<string, number> = { "": 1, hz: 1, khz: 1e3, mhz: 1e6, "s/s": 1, "1/s": 1 };
const S: Record<string, number> = { "": 1, s: 1, ms: 1e-3, us: 1e-6, µs: 1e-6, ns: 1e-9 };

const normKey = (k: string) =>
  k
    .toLowerCase()
    .replace(/[_\-.]+/g, " ")
    .replace(/\s+/g, " ")
    .trim();

/** "5 kHz" → {number: 5, unit: "khz"}; undefined when the value is not a number and a unit. */
function numberAndUnit(value: string): { number: number; unit: string } | undefined {
  const m = /^([+-]?\d+(?:[.,]\d+)?(?:e[+-]?\d+)?)\s*([a-zµ/0-9]*)$/i.exec(value.trim());
  if (!m) return undefined;
  const number = Number((m[1] ?? "").replace(",", "."));
  return Number.isFinite(number) && number > 0
    ? { number, unit: (m[2] ?? "").toLowerCase() }
    : undefined;
}

/** The first sample rate (Hz) the metadata states in a form above, or undefined. */
export function statedRateHz(metadata: readonly SourceMetadataEntry[]): number | undefined {
  for (const { key, value } of metadata) {
    const k = normKey(key);
    const v = numberAndUnit(value);
    if (!v) continue;
    if (RATE_KEYS.has(k) && HZ[v.unit] !== undefined) return v.number * (HZ[v.unit] ?? 1);
    if (INTERVAL_KEYS.has(k) && S[v.unit] !== undefined) return 1 / (v.number * (S[v.unit] ?? 1));
  }
  return undefined;
}

const hz = (v: number) => `${Number(v.toPrecision(6))} Hz`;

/**
 * The `stated_rate_mismatch` warning when the preamble's rate and the time column's mean rate
 * differ by more than STATED_RATE_TOLERANCE (relative to the stated one); none otherwise.
 */
export function rateMismatch(
  stated: number | undefined,
  log: Pick<DriveLog, "sampleRateHz">,
): SignalIssue[] {
  const measured = log.sampleRateHz;
  if (stated === undefined || !(measured > 0)) return [];
  if (Math.abs(measured - stated) <= STATED_RATE_TOLERANCE * stated) return [];
  return [
    {
      code: "stated_rate_mismatch",
      message: `the file states a sample rate of ${hz(stated)}, but its time column gives ${hz(measured)}; the time column is used`,
    },
  ];
}
