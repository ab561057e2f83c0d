/**
 * The order maps' colour ramp and level scale (pure). The ramp is viridis — perceptually
 * uniform, ordered dark to light and readable with the common colour-vision deficiencies — by
 * Stéfan van der Walt, Nathaniel Smith and Eric Firing (BIDS "mpl-colormaps", 2015, released
 * CC0). Its published 256-entry table (sRGB, 0–1) is sampled here every 8th entry plus the last
 * and interpolated linearly between them.
 */
import { amplitudeDb } from "~/lib/domain/chart-units";

/** [table index, r, g, b] from the published viridis table (entries 0, 8, …, 248, 255). */
const VIRIDIS_STOPS: readonly (readonly [number, number, number, number])[] = [
  [0, 0.267004, 0.004874, 0.329415],
  [8, 0.277018, 0.050344, 0.375715],
  [16, 0.282327, 0.094955, 0.417331],
  [24, 0.282884, 0.13592, 0.453427],
  [32, 0.278826, 0.17549, 0.483397],
  [40, 0.270595, 0.214069, 0.507052],
  [48, 0.258965, 0.251537, 0.524736],
  [56, 0.244972, 0.287675, 0.53726],
  [64, 0.229739, 0.322361, 0.545706],
  [72, 0.214298, 0.355619, 0.551184],
  [80, 0.19943, 0.387607, 0.554642],
  [88, 0.185556, 0.41857, 0.556753],
  [96, 0.172719, 0.448791, 0.557885],
  [104, 0.160665, 0.47854, 0.558115],
  [112, 0.149039, 0.508051, 0.55725],
  [120, 0.13777, 0.537492, 0.554906],
  [128, 0.127568, 0.566949, 0.550556],
  [136, 0.120565, 0.596422, 0.543611],
  [144, 0.120638, 0.625828, 0.533488],
  [152, 0.132268, 0.655014, 0.519661],
  [160, 0.157851, 0.683765, 0.501686],
  [168, 0.196571, 0.711827, 0.479221],
  [176, 0.24607, 0.73891, 0.452024],
  [184, 0.304148, 0.764704, 0.419943],
  [192, 0.369214, 0.788888, 0.382914],
  [200, 0.440137, 0.811138, 0.340967],
  [208, 0.515992, 0.831158, 0.294279],
  [216, 0.595839, 0.848717, 0.243329],
  [224, 0.678489, 0.863742, 0.189503],
  [232, 0.762373, 0.876424, 0.137064],
  [240, 0.845561, 0.887322, 0.099702],
  [248, 0.926106, 0.89733, 0.104071],
  [255, 0.993248, 0.906157, 0.143936],
];

export type Rgb = [r: number, g: number, b: number];

/** Viridis at t ∈ [0, 1] (clamped; NaN counts as 0), sRGB channels 0–1. */
export function viridis(t: number): Rgb {
  const x = (Number.isFinite(t) ? Math.min(1, Math.max(0, t)) : 0) * 255;
  let i = 0;
  while (i < VIRIDIS_STOPS.length - 2 && VIRIDIS_STOPS[i + 1]![0] < x) i++;
  const a = VIRIDIS_STOPS[i]!;
  const b = VIRIDIS_STOPS[i + 1]!;
  const f = (x - a[0]) / (b[0] - a[0]);
  return [a[1] + (b[1] - a[1]) * f, a[2] + (b[2] - a[2]) * f, a[3] + (b[3] - a[3]) * f];
}

/** 0–1 channels as a CSS colour. */
export function rgbCss([r, g, b]: Rgb): string {
  return `rgb(${Math.round(r * 255)} ${Math.round(g * 255)} ${Math.round(b * 255)})`;
}

/** Relative luminance of an sRGB colour (WCAG 2.x definition, IEC 61966-2-1 transfer). */
export function relativeLuminance([r, g, b]: Rgb): number {
  const lin = (c: number) => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
  return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
}

export type LevelMode = "dB" | "linear";

/** Range shown in dB mode below the largest cell (common practice for order maps). */
export const DB_RANGE = 60;

export interface LevelScale {
  mode: LevelMode;
  /** Scale ends in the scale's own unit (dB re 1 rpm, or rpm). */
  min: number;
  max: number;
  unit: string;
  /** Position 0–1 of an amplitude (rpm) on the scale, clamped. */
  position(amplitudeRpm: number): number;
}

/**
 * One scale for several maps: linear from 0 to the largest amplitude, or dB re 1 rpm over
 * DB_RANGE below the largest. `maxRpm` ≤ 0 (an all-zero map) gives a 0–1 rpm scale.
 */
export function levelScale(mode: LevelMode, maxRpm: number): LevelScale {
  const top = maxRpm > 0 ? maxRpm : 1;
  if (mode === "linear") {
    return {
      mode,
      min: 0,
      max: top,
      unit: "rpm",
      position: (a) => clamp01(a / top),
    };
  }
  const max = Math.ceil(amplitudeDb(top));
  const min = max - DB_RANGE;
  return {
    mode,
    min,
    max,
    unit: "dB re 1 rpm",
    position: (a) => (a > 0 ? clamp01((amplitudeDb(a) - min) / DB_RANGE) : 0),
  };
}

function clamp01(x: number): number {
  return Number.isFinite(x) ? Math.min(1, Math.max(0, x)) : 0;
}

/**
 * Largest cell of one or more maps (rows × orders, rpm), from column `fromColumn` on: the
 * columns below order 0.5 hold the speed change of a run-up leaking into the block spectra,
 * which would otherwise set the top of the scale and wash out the engine orders.
 */
export function mapMaximum(maps: number[][][], fromColumn = 0): number {
  let max = 0;
  for (const map of maps)
    for (const row of map)
      for (let k = fromColumn; k < row.length; k++) if (row[k]! > max) max = row[k]!;
  return max;
}
