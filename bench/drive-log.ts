/**
 * Writes a long synthetic two-channel drive log for the benchmark (not test truth, not demo
 * data): crank and gearbox-input speed in rpm at a fixed sampling rate, following a repeated
 * speed profile (start, idle, run-up, steady, coast-down) with a firing-order fluctuation that
 * the gearbox side sees through a base-excited two-mass transmissibility.
 */
import { closeSync, openSync, writeSync } from "node:fs";

export interface BenchLogOptions {
  /** Length of the log in s. */
  durationS: number;
  /** Sampling rate in Hz. */
  sampleRateHz: number;
  /** Firing order (2 for a four-cylinder four-stroke). */
  order: number;
}

/** Knots (time in s, engine speed in rpm) of one 120 s cycle; the log repeats it. */
export const PROFILE: [number, number][] = [
  [0, 250],
  [2, 300],
  [4, 850],
  [20, 800],
  [50, 4200],
  [60, 4200],
  [75, 900],
  [85, 800],
  [95, 2000],
  [105, 2000],
  [115, 1200],
  [120, 250],
];

/** Engine speed in rpm at time tS of the repeated profile (piecewise linear). */
function profileRpm(tS: number): number {
  const cycle = PROFILE[PROFILE.length - 1]?.[0] ?? 1;
  const t = tS % cycle;
  for (let i = 1; i < PROFILE.length; i++) {
    const [t1, n1] = PROFILE[i] ?? [0, 0];
    const [t0, n0] = PROFILE[i - 1] ?? [0, 0];
    if (t <= t1) return n0 + ((n1 - n0) * (t - t0)) / (t1 - t0);
  }
  return PROFILE[0]?.[1] ?? 0;
}

/** Base-excited transmissibility magnitude T(r, ζ) (Harris' Shock and Vibration Handbook ch. 30). */
function transmissibility(r: number, zeta: number): number {
  const num = 1 + (2 * zeta * r) ** 2;
  return Math.sqrt(num / ((1 - r * r) ** 2 + (2 * zeta * r) ** 2));
}

/** The log's samples in order: time in s, crank and gearbox-input speed in rpm. */
export function* benchSamples(o: BenchLogOptions): Generator<[number, number, number]> {
  const rows = Math.round(o.durationS * o.sampleRateHz);
  const dt = 1 / o.sampleRateHz;
  const naturalHz = 15;
  const zeta = 0.12;
  let thetaRad = 0;
  let seed = 12345;
  const noise = () => {
    seed = (seed * 1103515245 + 12345) & 0x7fffffff;
    return seed / 0x7fffffff - 0.5;
  };
  for (let i = 0; i < rows; i++) {
    const t = i * dt;
    const rpm = profileRpm(t);
    thetaRad += (rpm * 2 * Math.PI * dt) / 60;
    const ampRpm = 25 * Math.min(1, 900 / Math.max(rpm, 300));
    const r = (o.order * rpm) / 60 / naturalHz;
    const phase = Math.atan2(2 * zeta * r * r * r, 1 - r * r + (2 * zeta * r) ** 2);
    const crank = rpm + ampRpm * Math.sin(o.order * thetaRad) + 0.2 * noise();
    const gear =
      rpm +
      ampRpm * transmissibility(r, zeta) * Math.sin(o.order * thetaRad - phase) +
      0.2 * noise();
    yield [t, crank, gear];
  }
}

/** Write the log as CSV ("time [s]", "crank speed [rpm]", "gearbox input speed [rpm]"). Returns bytes and rows. */
export function writeBenchLog(path: string, o: BenchLogOptions): { bytes: number; rows: number } {
  const fd = openSync(path, "w");
  let bytes = 0;
  let rows = 0;
  let buf = "time [s],crank speed [rpm],gearbox input speed [rpm]\n";
  for (const [t, crank, gear] of benchSamples(o)) {
    buf += `${t.toFixed(6)},${crank.toFixed(4)},${gear.toFixed(4)}\n`;
    rows++;
    if (buf.length > 1 << 20) {
      bytes += writeSync(fd, buf);
      buf = "";
    }
  }
  bytes += writeSync(fd, buf);
  closeSync(fd);
  return { bytes, rows };
}

// `tsx bench/drive-log.ts OUT.csv [durationS] [sampleRateHz]`: the bench writes its log in a
// child process so the generator's memory does not count in the analysis' peak RSS.
if (process.argv[1] && import.meta.url === new URL(`file://${process.argv[1]}`).href) {
  const [out, dur, rate] = process.argv.slice(2);
  if (!out) throw new Error("usage: tsx bench/drive-log.ts OUT.csv [durationS] [sampleRateHz]");
  const r = writeBenchLog(out, {
    durationS: Number(dur ?? 600),
    sampleRateHz: Number(rate ?? 5000),
    order: 2,
  });
  process.stdout.write(`${JSON.stringify(r)}\n`);
}
