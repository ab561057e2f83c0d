/** Small pure helpers shared by the charts: lookups, axis ticks, gaps, number formatting. */

/**
 * Index of the value in ascending `sorted` nearest to `x` (the lower one on a tie); −1 for an
 * empty array or a non-finite x.
 */
export function nearestIndex(sorted: readonly number[], x: number): number {
  if (sorted.length === 0 || !Number.isFinite(x)) return -1;
  let lo = 0;
  let hi = sorted.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (sorted[mid]! <= x) lo = mid;
    else hi = mid;
  }
  return Math.abs(sorted[hi]! - x) < Math.abs(sorted[lo]! - x) ? hi : lo;
}

/**
 * Axis ticks within [min, max], about `count` of them, at the 1, 2 or 5 × 10ⁿ step nearest to
 * (max − min)/count (the rounding of Heckbert's nicenum, "Nice numbers for graph labels",
 * Graphics Gems, 1990).
 */
export function niceTicks(min: number, max: number, count = 6): number[] {
  if (!Number.isFinite(min) || !Number.isFinite(max) || count < 1) return [];
  if (max < min) [min, max] = [max, min];
  if (max === min) return [min];
  const raw = (max - min) / count;
  const mag = 10 ** Math.floor(Math.log10(raw));
  const f = raw / mag;
  const step = (f < 1.5 ? 1 : f < 3 ? 2 : f < 7 ? 5 : 10) * mag;
  const ticks: number[] = [];
  // Integer multiples of the step, so ticks never drift (0.1 + 0.2 …).
  for (let k = Math.ceil(min / step - 1e-9); k * step <= max + step * 1e-9; k++)
    ticks.push(Number((k * step).toPrecision(12)));
  return ticks;
}

/**
 * A gap (null) between samples further apart than `factor` × the median spacing, so a line
 * chart does not join two separate stretches (e.g. two idle segments).
 */
export function withGaps(
  x: readonly number[],
  ys: readonly (readonly (number | null)[])[],
  factor = 3,
): { x: number[]; ys: (number | null)[][] } {
  const steps = x.slice(1).map((v, i) => v - x[i]!);
  const sorted = [...steps].sort((a, b) => a - b);
  const median = sorted.length ? sorted[Math.floor(sorted.length / 2)]! : 0;
  const outX: number[] = [];
  const outYs: (number | null)[][] = ys.map(() => []);
  x.forEach((v, i) => {
    if (i > 0 && median > 0 && v - x[i - 1]! > factor * median) {
      outX.push((v + x[i - 1]!) / 2);
      outYs.forEach((y) => y.push(null));
    }
    outX.push(v);
    ys.forEach((y, k) => outYs[k]!.push(y[i] ?? null));
  });
  return { x: outX, ys: outYs };
}

/** [min, max] of the finite values, or null. */
export function extent(...series: readonly (readonly (number | null | undefined)[])[]) {
  let min = Infinity;
  let max = -Infinity;
  for (const s of series)
    for (const v of s)
      if (typeof v === "number" && Number.isFinite(v)) {
        if (v < min) min = v;
        if (v > max) max = v;
      }
  return min <= max ? ([min, max] as [number, number]) : null;
}

/**
 * A figure for a readout or label: up to 4 significant digits (no exponent between 0.001 and
 * 10⁶), thin grouping left out, a true minus sign.
 */
export function formatValue(v: number | null | undefined, digits = 4): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return "—";
  if (v === 0) return "0";
  const abs = Math.abs(v);
  let text: string;
  if (abs >= 10 ** digits) text = Math.round(abs).toString();
  else if (abs >= 0.001) text = String(Number(abs.toPrecision(digits)));
  else text = abs.toExponential(digits - 1);
  return (v < 0 ? "−" : "") + text;
}
