/**
 * `tsx bench/analyse-samples.bench.ts`: peak memory of the bounded-memory analysis
 * (analyseSamples, app/lib/signal/analyse-samples.ts) against the log's length (issue 17, goal
 * 1: ≤ 150 MB for a 1 GiB log of 34 M rows, and within 10 % of the peak for a ~3 M-row log).
 * The samples come from a generated SampleSource that computes an analytic log on the fly from
 * the sample index (no arrays): a repeated 120 s speed profile (start, idle, run-up, steady,
 * coast-down) at 5 kHz with a firing-order fluctuation the gearbox sees through a base-excited
 * two-mass transmissibility (Harris' Shock and Vibration Handbook ch. 30). Each figure is
 * measured in a child process of its own (peak RSS, process.resourceUsage().maxRSS, is per
 * process); the time of analyseDriveLog on the same 3 M samples held in arrays is printed beside
 * the windowed analysis's (median of 3; the machine is shared, so the figures are noisy).
 *
 * `tsx bench/analyse-samples.bench.ts child MODE ROWS` runs one measurement: MODE stream (the
 * generated source), stream-steady (the same without transients), memory (analyseSamples over
 * memorySource of the samples in arrays) or batch (analyseDriveLog on them). BENCH_SMALL_ROWS and
 * BENCH_LARGE_ROWS change the two lengths, BENCH_WINDOW the window, BENCH_TRACE=1 prints the
 * process's memory at each progress call.
 */
import { execFileSync } from "node:child_process";
import { fileURLToPath } from "node:url";
import { analyseDriveLog } from "../app/lib/signal/analyse.ts";
import { analyseSamples } from "../app/lib/signal/analyse-samples.ts";
import {
  memorySource,
  type SampleSource,
  type SampleWindow,
} from "../app/lib/signal/sample-source.ts";
import type { DriveLog } from "../app/lib/signal/types.ts";
import { PROFILE } from "./drive-log.ts";
import { ratioLine } from "./goal-lines.ts";

const RATE_HZ = 5000;
const ORDER = 2;
const GOAL_MB = 150;
const SMALL_ROWS = Number(process.env.BENCH_SMALL_ROWS ?? 3_000_000);
const LARGE_ROWS = 34_000_000;

/**
 * Knots (s, rpm) of one 120 s cycle of the Kestrel bench drive (bench/drive-log.ts); the log
 * repeats it.
 */
const KNOTS = PROFILE;
const CYCLE_S = 120;
const RAD_PER_RPM = (2 * Math.PI) / 60;
/** Crank angle at each knot (the integral of the piecewise-linear speed), rad. */
const KNOT_ANGLE = KNOTS.map(() => 0);
for (let k = 1; k < KNOTS.length; k++) {
  const [t0, n0] = KNOTS[k - 1]!;
  const [t1, n1] = KNOTS[k]!;
  KNOT_ANGLE[k] = KNOT_ANGLE[k - 1]! + 0.5 * (n0 + n1) * RAD_PER_RPM * (t1 - t0);
}
const CYCLE_ANGLE = KNOT_ANGLE[KNOTS.length - 1]!;

/** Speed (rad/s) and crank angle (rad) at time t of the repeated profile. */
function profile(t: number): [number, number] {
  const c = Math.floor(t / CYCLE_S);
  const tc = t - c * CYCLE_S;
  let k = 1;
  while (k < KNOTS.length - 1 && KNOTS[k]![0] < tc) k++;
  const [t0, n0] = KNOTS[k - 1]!;
  const [t1, n1] = KNOTS[k]!;
  const w0 = n0 * RAD_PER_RPM;
  const slope = ((n1 - n0) * RAD_PER_RPM) / (t1 - t0);
  const tau = tc - t0;
  return [
    w0 + slope * tau,
    c * CYCLE_ANGLE + KNOT_ANGLE[k - 1]! + w0 * tau + 0.5 * slope * tau * tau,
  ];
}

/** Uniform in [−0.5, 0.5) from the sample index (a 32-bit integer hash), for sensor noise. */
function noise(i: number, salt: number): number {
  let h = Math.imul(i ^ salt, 0x9e3779b1);
  h ^= h >>> 15;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  return (h >>> 0) / 2 ** 32 - 0.5;
}

/** The analytic log's samples [a, b): time s, speeds rad/s. */
function samples(a: number, b: number): SampleWindow {
  const n = Math.max(0, b - a);
  const out = {
    timeS: new Float64Array(n),
    crankRadS: new Float64Array(n),
    gearboxRadS: new Float64Array(n),
  };
  const fnHz = 15;
  const zeta = 0.12;
  for (let j = 0; j < n; j++) {
    const i = a + j;
    const t = i / RATE_HZ;
    const [w, theta] = profile(t);
    const amp =
      25 * RAD_PER_RPM * Math.min(1, (900 * RAD_PER_RPM) / Math.max(w, 300 * RAD_PER_RPM));
    const r = (ORDER * w) / (2 * Math.PI) / fnHz;
    const d = 2 * zeta * r;
    const gain = Math.sqrt((1 + d * d) / ((1 - r * r) ** 2 + d * d));
    const phase = Math.atan2(d * r * r, 1 - r * r + d * d);
    out.timeS[j] = t;
    out.crankRadS[j] = w + amp * Math.sin(ORDER * theta) + 0.02 * noise(i, 1);
    out.gearboxRadS[j] = w + amp * gain * Math.sin(ORDER * theta - phase) + 0.02 * noise(i, 2);
  }
  return out;
}

const SOURCE_META = {
  rows: 0,
  delimiter: ",",
  decimal: "." as const,
  timeColumn: "time [s]",
  crankColumn: "crank speed [rad/s]",
  gearboxColumn: "gearbox input speed [rad/s]",
  timeUnit: "s" as const,
  crankUnit: "rad/s" as const,
  gearboxUnit: "rad/s" as const,
};

/** A SampleSource over the analytic log of `rows` samples, computed on request. */
function generatedSource(rows: number): SampleSource {
  return {
    length: rows,
    sampleRateHz: RATE_HZ,
    source: { ...SOURCE_META, rows },
    read: (a, b) => samples(Math.max(0, a), Math.min(rows, b)),
    close: () => {},
  };
}

/**
 * One measurement's line for the parent: analysis time from `t0`, the process's peak RSS,
 * blocks.
 */
function report(t0: number, blocks: number): void {
  console.log(
    JSON.stringify({
      ms: performance.now() - t0,
      rssMB: process.resourceUsage().maxRSS / 1024,
      blocks,
    }),
  );
}

function child(mode: string, rows: number): void {
  const t0 = performance.now();
  if (mode === "batch" || mode === "memory") {
    // The same samples in arrays: analyseDriveLog, or analyseSamples over memorySource.
    const w = samples(0, rows);
    const log: DriveLog = {
      ...w,
      extra: {},
      sampleRateHz: RATE_HZ,
      source: { ...SOURCE_META, rows },
    };
    const t1 = performance.now();
    const r = mode === "batch" ? analyseDriveLog(log) : analyseSamples(memorySource(log));
    if (!r.ok) throw new Error(r.error.message);
    report(t1, r.value.blocks);
    return;
  }
  const trace = process.env.BENCH_TRACE
    ? (stage: string, f: number) =>
        console.error(
          stage,
          f.toFixed(2),
          Object.entries(process.memoryUsage())
            .map(([k, v]) => `${k} ${(v / 2 ** 20).toFixed(0)}`)
            .join(" "),
        )
    : undefined;
  const windowSamples = process.env.BENCH_WINDOW ? Number(process.env.BENCH_WINDOW) : undefined;
  const r = analyseSamples(generatedSource(rows), { transients: mode !== "stream-steady" }, trace, {
    windowSamples,
  });
  if (!r.ok) throw new Error(r.error.message);
  report(t0, r.value.blocks);
}

function run(mode: string, rows: number): { ms: number; rssMB: number; blocks: number } {
  const self = fileURLToPath(import.meta.url);
  const out = execFileSync(
    process.execPath,
    ["--import", "tsx", self, "child", mode, String(rows)],
    {
      encoding: "utf8",
      stdio: ["ignore", "pipe", "inherit"],
    },
  );
  return JSON.parse(out.trim().split("\n").pop()!);
}

const median = (x: number[]) => [...x].sort((a, b) => a - b)[x.length >> 1]!;

if (process.argv[2] === "child") {
  child(process.argv[3]!, Number(process.argv[4]));
} else {
  const rowsLarge = Number(process.env.BENCH_LARGE_ROWS ?? LARGE_ROWS);
  const small = [0, 1, 2].map(() => run("stream", SMALL_ROWS));
  const batch = [0, 1, 2].map(() => run("batch", SMALL_ROWS));
  const large = run("stream", rowsLarge);
  const smallMB = median(small.map((s) => s.rssMB));
  const mb = (x: number) => `${x.toFixed(0)} MB`;
  console.log(
    `windowed analysis of a generated ${RATE_HZ} Hz log (analyseSamples), peak RSS per process:`,
  );
  console.log(
    `  ${SMALL_ROWS.toLocaleString("en")} rows: ${mb(smallMB)}, ${(median(small.map((s) => s.ms)) / 1000).toFixed(2)} s (median of 3), ${small[0]!.blocks} blocks`,
  );
  console.log(
    `  ${rowsLarge.toLocaleString("en")} rows: ${mb(large.rssMB)}, ${(large.ms / 1000).toFixed(1)} s, ${large.blocks} blocks`,
  );
  console.log(
    `  goal: ≤ ${GOAL_MB} MB → ${large.rssMB <= GOAL_MB ? "met" : "NOT met"}; large / small = ${(large.rssMB / smallMB).toFixed(2)} (goal ≤ 1.10 → ${large.rssMB <= 1.1 * smallMB ? "met" : "NOT met"})`,
  );
  ratioLine(
    "1",
    "windowed analysis under tsx (its loader ~95 MB), 34 M rows vs goal",
    large.rssMB,
    "MB",
    GOAL_MB,
    "≤ 1",
  );
  ratioLine(
    "1",
    "windowed analysis peak RSS, 34 M vs 3 M rows",
    large.rssMB,
    "MB",
    smallMB,
    "≤ 1.1",
  );
  const memory = [0, 1, 2].map(() => run("memory", SMALL_ROWS));
  const bMs = median(batch.map((s) => s.ms));
  const mMs = median(memory.map((s) => s.ms));
  console.log(
    `  same ${SMALL_ROWS.toLocaleString("en")} samples held in arrays (median of 3, analysis only): analyseDriveLog ${(bMs / 1000).toFixed(2)} s, ${mb(median(batch.map((s) => s.rssMB)))}; analyseSamples over memorySource ${(mMs / 1000).toFixed(2)} s → windowed / batch time = ${(mMs / bMs).toFixed(2)}`,
  );
}
