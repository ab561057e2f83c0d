/**
 * Comparison of two or more drive logs' isolation curves (docs/architecture.md §3 "comparison"): the change
 * in isolation per engine-speed band against the first (reference) drive log, which one isolates
 * better in each band, and a one-sentence verdict. Pure; shared by the page and its tests.
 *
 * Rules (product rules, see README "Comparison"):
 * - A band [lo, lo + bandRpm) holds the isolation bins whose centre lies in it; a drive log's band
 *   value is the mean of those bins' dB values (bins are equally wide, so this is the mean over
 *   engine speed of the isolation curve).
 * - A band is compared only where both drive logs have bins in it.
 * - Differences smaller than `sameWithinDb` count as "about the same" (default 0.5 dB, a common
 *   practice for repeat road-test measurements; adjust per programme).
 */
import { dbText } from "./format";

export interface IsolationCurve {
  logId: number;
  /** What the sentence calls it, e.g. "variant B". */
  name: string;
  rpm: number[];
  dB: number[];
}

export interface BandRow {
  /** Band edges, rpm: [from, to). */
  fromRpm: number;
  toRpm: number;
  /** Mean isolation per drive log in this band, dB, in the curves' order; null where not covered. */
  dB: (number | null)[];
  /** Change of each drive log against the reference (first) one, dB; null for the reference or where either lacks data. */
  changeDb: (number | null)[];
  /** Index of the drive log with the most isolation in this band, or null when all are within sameWithinDb or only one is covered. */
  best: number | null;
}

export interface Comparison {
  bandRpm: number;
  sameWithinDb: number;
  rows: BandRow[];
  /** One sentence per compared drive log (index 1…), against the reference. */
  verdicts: string[];
}

export const DEFAULT_BAND_RPM = 250;
export const SAME_WITHIN_DB = 0.5;

function bandMeans(curve: IsolationCurve, bandRpm: number): Map<number, number> {
  const sums = new Map<number, { s: number; n: number }>();
  curve.rpm.forEach((rpm, i) => {
    const key = Math.floor(rpm / bandRpm);
    const e = sums.get(key) ?? { s: 0, n: 0 };
    e.s += curve.dB[i]!;
    e.n += 1;
    sums.set(key, e);
  });
  return new Map([...sums].map(([k, e]) => [k, e.s / e.n]));
}

const r1 = (x: number) => Math.round(x * 10) / 10;

export function compareIsolation(
  curves: IsolationCurve[],
  bandRpm = DEFAULT_BAND_RPM,
  sameWithinDb = SAME_WITHIN_DB,
): Comparison {
  const means = curves.map((c) => bandMeans(c, bandRpm));
  const keys = [...new Set(means.flatMap((m) => [...m.keys()]))].sort((a, b) => a - b);
  const rows: BandRow[] = keys.map((key) => {
    const dB = means.map((m) => (m.has(key) ? r1(m.get(key)!) : null));
    const ref = means[0]?.get(key);
    const changeDb = means.map((m, i) =>
      i === 0 || ref === undefined || !m.has(key) ? null : r1(m.get(key)! - ref),
    );
    const covered = dB.map((v, i) => ({ v, i })).filter((x) => x.v !== null) as {
      v: number;
      i: number;
    }[];
    let best: number | null = null;
    if (covered.length >= 2) {
      const sorted = [...covered].sort((a, b) => b.v - a.v);
      if (sorted[0]!.v - sorted[1]!.v >= sameWithinDb) best = sorted[0]!.i;
    }
    return { fromRpm: key * bandRpm, toRpm: (key + 1) * bandRpm, dB, changeDb, best };
  });
  const verdicts = curves
    .slice(1)
    .map((c, j) => verdict(c.name, curves[0]!.name, rows, j + 1, sameWithinDb));
  return { bandRpm, sameWithinDb, rows, verdicts };
}

interface Run {
  from: number;
  to: number;
  mean: number;
  bands: number;
  reachesTop: boolean;
  startsAtBottom: boolean;
}

/** Runs of adjacent compared bands whose change has one sign and exceeds the threshold. */
function runs(rows: BandRow[], index: number, sameWithinDb: number, sign: 1 | -1): Run[] {
  const compared = rows.filter((r) => r.changeDb[index] !== null);
  const top = compared.at(-1)?.toRpm;
  const bottom = compared[0]?.fromRpm;
  const out: Run[] = [];
  let current: { from: number; to: number; sum: number; n: number } | null = null;
  const close = () => {
    if (current)
      out.push({
        from: current.from,
        to: current.to,
        mean: current.sum / current.n,
        bands: current.n,
        reachesTop: current.to === top,
        startsAtBottom: current.from === bottom,
      });
    current = null;
  };
  for (const row of compared) {
    const change = row.changeDb[index]!;
    const qualifies = sign * change >= sameWithinDb;
    if (qualifies && current && current.to === row.fromRpm) {
      current.to = row.toRpm;
      current.sum += change;
      current.n += 1;
    } else if (qualifies) {
      close();
      current = { from: row.fromRpm, to: row.toRpm, sum: change, n: 1 };
    } else close();
  }
  close();
  return out;
}

function where(run: Run): string {
  // "above" only for a run that ends at the top of the compared range and does not start at its bottom.
  return run.reachesTop && !run.startsAtBottom && run.bands > 1
    ? `above ${run.from} rpm`
    : `between ${run.from} and ${run.to} rpm`;
}

/** The largest run by (bands × |mean change|): the one that matters most to the engineer. */
function largest(list: Run[]): Run | null {
  return list.reduce<Run | null>(
    (best, r) =>
      !best || r.bands * Math.abs(r.mean) > best.bands * Math.abs(best.mean) ? r : best,
    null,
  );
}

function verdict(
  name: string,
  refName: string,
  rows: BandRow[],
  index: number,
  sameWithinDb: number,
): string {
  const compared = rows.filter((r) => r.changeDb[index] !== null);
  if (compared.length === 0)
    return `${capitalise(name)} and ${refName} share no engine-speed range, so they cannot be compared.`;
  const gain = largest(runs(rows, index, sameWithinDb, 1));
  const loss = largest(runs(rows, index, sameWithinDb, -1));
  const from = compared[0]!.fromRpm;
  const to = compared.at(-1)!.toRpm;
  if (!gain && !loss)
    return `${capitalise(name)} and ${refName} isolate within ${sameWithinDb} dB of each other between ${from} and ${to} rpm.`;
  const parts: string[] = [];
  if (gain) parts.push(`${dbText(gain.mean)} more ${where(gain)}`);
  if (loss) parts.push(`${dbText(Math.abs(loss.mean))} less ${where(loss)}`);
  return `${capitalise(name)} isolates ${parts.join(", ")} than ${refName}.`;
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
