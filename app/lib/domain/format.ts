/**
 * How every figure is written on screen (pure, shared by the server render and the browser): one
 * rounding rule per quantity, so the verdict strip, the tables, the charts' readouts, legends and
 * text alternatives, the comparison and the rattle page agree to the last digit. CSV downloads are
 * not formatted here: they keep the full precision of the data (charts/csv.ts).
 *
 * | quantity                                         | rule                                    | e.g.       |
 * | ------------------------------------------------ | --------------------------------------- | ---------- |
 * | isolation, levels and their changes, dB          | 1 decimal                               | −3.2 dB    |
 * | engine or shaft speed, rpm                       | whole number                            | 1250 rpm   |
 * | angular-velocity amplitude (rpm 0-peak, rad/s)   | 3 significant digits, whole from 100 up | 4.27 rpm   |
 * | angular acceleration (rattle, amplitude), rad/s² | whole number                            | 412 rad/s² |
 * | time and duration, s                             | 1 decimal                               | 12.3 s     |
 * | natural frequency, Hz                            | 2 decimals                              | 14.23 Hz   |
 * | sample rate, Hz                                  | whole number                            | 1000 Hz    |
 * | damping ratio (no unit)                          | 3 decimals                              | 0.118      |
 * | order                                            | up to 2 decimals, no trailing zeros     | 2, 1.5     |
 * | share, %                                         | whole number                            | 42 %       |
 * | angle (twist, travel, margin), °                 | 1 decimal, no space before °            | 14.2°      |
 *
 * Negative numbers carry a true minus sign (U+2212); a value that is not a finite number is "—".
 * The rules are ours (documented here and in DEVELOPERS.md), chosen near the resolution the
 * analysis gives (engine-speed bins are 50 rpm or wider; road-test levels do not repeat to better
 * than about 0.1 dB, common practice). Axis tick labels keep chart-math's formatValue: they are
 * round numbers, not measured figures.
 */

const MINUS = "−";
export const NO_VALUE = "—";

const formatters = new Map<string, Intl.NumberFormat>();
function formatter(key: string, opts: Intl.NumberFormatOptions): Intl.NumberFormat {
  let f = formatters.get(key);
  if (!f) {
    // Rounds the decimal as written, half away from zero (19.45 → 19.5), unlike toFixed, which
    // rounds the binary value (19.45 is 19.4499… in binary, so toFixed(1) gives 19.4).
    f = new Intl.NumberFormat("en-US", { useGrouping: false, ...opts });
    formatters.set(key, f);
  }
  return f;
}

/** Unsigned text of |x| by `f`, then a true minus sign unless it rounds to zero. */
function signed(x: number, f: Intl.NumberFormat): string {
  const text = f.format(Math.abs(x));
  return Number(text) === 0 ? text : (x < 0 ? MINUS : "") + text;
}

/** x with `decimals` decimals, true minus sign, and never "−0.0". */
export function fixed(x: number | null | undefined, decimals: number): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return NO_VALUE;
  const opts = { minimumFractionDigits: decimals, maximumFractionDigits: decimals };
  return signed(x, formatter(`f${decimals}`, opts));
}

/** x to `digits` significant digits, but whole (never rounded to tens) from 10^(digits−1) up. */
export function significant(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return NO_VALUE;
  if (x === 0) return "0";
  const abs = Math.abs(x);
  if (abs < 1e-3) return (x < 0 ? MINUS : "") + abs.toExponential(digits - 1);
  const f =
    abs >= 10 ** (digits - 1) - 0.5
      ? formatter("f0", { minimumFractionDigits: 0, maximumFractionDigits: 0 })
      : formatter(`s${digits}`, { maximumSignificantDigits: digits });
  return signed(x, f);
}

// Numbers without their unit (table cells under a header that names the unit).
export const dbNumber = (x: number | null | undefined) => fixed(x, 1);
export const rpmNumber = (x: number | null | undefined) => fixed(x, 0);
export const amplitudeNumber = (x: number | null | undefined) => significant(x, 3);
export const secondsNumber = (x: number | null | undefined) => fixed(x, 1);
export function orderNumber(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return NO_VALUE;
  return signed(x, formatter("o", { maximumFractionDigits: 2 }));
}

// Numbers with their unit.
export const dbText = (x: number | null | undefined) => `${dbNumber(x)} dB`;
export const rpmText = (x: number | null | undefined) => `${rpmNumber(x)} rpm`;
export const radS2Number = (x: number | null | undefined) => fixed(x, 0);
export const radS2Text = (x: number | null | undefined) => `${radS2Number(x)} rad/s²`;
/** An amplitude in its unit: "rpm" or "rad/s" by the amplitude rule, "rad/s²" by its own. */
export const amplitudeText = (x: number | null | undefined, unit: string) =>
  unit === "rad/s²" ? radS2Text(x) : `${amplitudeNumber(x)} ${unit}`;
export const secondsText = (x: number | null | undefined) => `${secondsNumber(x)} s`;
export const frequencyText = (hz: number | null | undefined) => `${fixed(hz, 2)} Hz`;
export const sampleRateText = (hz: number | null | undefined) => `${fixed(hz, 0)} Hz`;
export const dampingRatioText = (x: number | null | undefined) => fixed(x, 3);
export const degreesNumber = (x: number | null | undefined) => fixed(x, 1);
export const degreesText = (x: number | null | undefined) => `${degreesNumber(x)}°`;
export const percentText = (share: number | null | undefined) =>
  `${fixed(share === null || share === undefined ? share : share * 100, 0)} %`;

/** A change with its sign: "+2.3", "−1.5", "±0.0" (dB, under a header that says so). */
export function dbChangeNumber(x: number | null | undefined): string {
  const text = dbNumber(x);
  if (text === NO_VALUE || text.startsWith(MINUS)) return text;
  return `${Number(text) === 0 ? "±" : "+"}${text}`;
}
/** A change with its sign: "+2.3 dB", "−1.5 dB", "±0.0 dB". */
export const dbChangeText = (x: number | null | undefined) => `${dbChangeNumber(x)} dB`;

/** "19.5 to 38.8 dB", or one figure when both ends round to the same. */
export function dbRangeText(lo: number | null | undefined, hi: number | null | undefined): string {
  const a = dbNumber(lo);
  const b = dbNumber(hi);
  return a === b ? `${a} dB` : `${a} to ${b} dB`;
}

/** "900–4000 rpm", or one figure when both ends round to the same. */
export function rpmRangeText(lo: number | null | undefined, hi: number | null | undefined): string {
  const a = rpmNumber(lo);
  const b = rpmNumber(hi);
  return a === b ? `${a} rpm` : `${a}–${b} rpm`;
}

/**
 * The isolation range of a curve, e.g. "19.5 to 38.8 dB": over its points above the gearbox noise
 * floor (all points when none is; those are lower bounds), null without points. The isolation
 * curve's text alternative and the drive-log page's isolation table both state this string.
 */
export function isolationRangeText(
  dB: readonly number[],
  aboveNoise: readonly boolean[],
): string | null {
  const trusted = dB.filter((_, i) => aboveNoise[i]);
  const use = trusted.length ? trusted : dB;
  return use.length ? dbRangeText(Math.min(...use), Math.max(...use)) : null;
}
