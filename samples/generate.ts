/**
 * Writes the demo drive logs of the invented "Kestrel" test programme (see samples/README.md).
 * Demo data, not test truth: the tests build their own analytic signals.
 *
 * Physics: a two-mass torsional model integrated in time (RK4). Primary J1 (crank, flywheel
 * primary) driven by per-cylinder gas torque; arc spring k and damper c; secondary J2 (flywheel
 * secondary, clutch, gearbox input). The vehicle in gear acts on the secondary as a smooth load
 * torque (its driveline compliance is left out, so the logs follow the two-mass model).
 * Run with: npx tsx samples/generate.ts
 */
import { writeFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

const OUT = dirname(fileURLToPath(import.meta.url));
const RAD_PER_RPM = (2 * Math.PI) / 60;
const NM_PER_RAD_PER_NM_PER_DEG = 180 / Math.PI;

/** Mulberry32: small, seeded, deterministic. */
function rng(seed: number) {
  let a = seed >>> 0;
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const gauss = () => Math.sqrt(-2 * Math.log(1 - uniform())) * Math.cos(2 * Math.PI * uniform());
  return { uniform, gauss };
}

interface Damper {
  name: string;
  springNmPerDeg: number;
  dampingRatio: number;
}
interface Vehicle {
  id: string;
  cylinders: number;
  idleRpm: number;
  maxRpm: number;
  j1: number; // kg·m²
  j2: number; // kg·m²
  /** Peak motoring (compression) torque per cylinder, N·m. */
  compressionNm: number;
  fullLoadNm: number;
  sampleRateHz: number;
  dampers: [Damper, Damper];
  /** Vehicle inertia seen at the gearbox input in third gear, kg·m². */
  vehicleInertiaThirdKgM2: number;
}

const VEHICLES: Vehicle[] = [
  {
    id: "KST-D4",
    cylinders: 4,
    idleRpm: 800,
    maxRpm: 4300,
    j1: 0.16,
    j2: 0.07,
    compressionNm: 240,
    fullLoadNm: 320,
    sampleRateHz: 2000,
    vehicleInertiaThirdKgM2: 12,
    dampers: [
      { name: "A", springNmPerDeg: 8, dampingRatio: 0.12 },
      { name: "B", springNmPerDeg: 5.5, dampingRatio: 0.07 },
    ],
  },
  {
    id: "KST-P3",
    cylinders: 3,
    idleRpm: 850,
    maxRpm: 5500,
    j1: 0.12,
    j2: 0.06,
    compressionNm: 150,
    fullLoadNm: 200,
    sampleRateHz: 1500,
    vehicleInertiaThirdKgM2: 9,
    dampers: [
      { name: "A", springNmPerDeg: 6, dampingRatio: 0.12 },
      { name: "B", springNmPerDeg: 5, dampingRatio: 0.07 },
    ],
  },
];

interface Schedule {
  durationS: number;
  /** Target crank speed, rpm, or null while the starter cranks / after key-off. */
  targetRpm: (t: number) => number | null;
  /** Starter motor engaged. */
  starter: (t: number) => boolean;
  /** Fuel on (combustion). */
  fuel: (t: number) => boolean;
  gear: number;
}

/** Runs the model and returns output-rate arrays: time s, crank and gearbox speed rad/s (with sensor noise). */
function simulate(v: Vehicle, d: Damper, s: Schedule, seed: number) {
  const r = rng(seed);
  const k = d.springNmPerDeg * NM_PER_RAD_PER_NM_PER_DEG;
  const c = 2 * d.dampingRatio * Math.sqrt(k * v.j2);
  const z = v.cylinders;
  const spread = Array.from({ length: z }, () => 1 + 0.04 * (r.uniform() - 0.5)); // cylinder-to-cylinder variation
  const comp = Array.from({ length: z }, () => 1 + 0.02 * (r.uniform() - 0.5));
  const jLoad = s.gear === 0 ? 0 : v.vehicleInertiaThirdKgM2;
  const oversample = 8;
  const dt = 1 / (v.sampleRateHz * oversample);
  const nOut = Math.round(s.durationS * v.sampleRateHz);
  const out = { t: new Float64Array(nOut), w1: new Float64Array(nOut), w2: new Float64Array(nOut) };

  // Combustion pulse (peak ~20° after firing TDC, width ~17°) and motoring torque (antisymmetric about TDC, zero mean).
  const burnMeanPerUnit = (0.3 * Math.sqrt(Math.PI)) / (4 * Math.PI);
  let burnNm = 0; // peak combustion torque per cylinder, set by the speed controller
  const gasTorque = (theta: number) => {
    let tq = 0;
    for (let i = 0; i < z; i++) {
      let phi = (theta - (i * 4 * Math.PI) / z) % (4 * Math.PI);
      if (phi > 2 * Math.PI) phi -= 4 * Math.PI;
      const x = phi / 0.55;
      tq -= v.compressionNm * comp[i]! * 1.65 * x * Math.exp(-x * x);
      if (burnNm > 0) tq += burnNm * spread[i]! * Math.exp(-(((phi - 0.35) / 0.3) ** 2));
    }
    return tq;
  };
  const friction1 = (w: number) => (w > 0.5 ? 8 + 0.02 * w : 0);
  const drag2 = (w: number) =>
    (w > 0.5 ? 1.5 + 0.004 * w : 0) + (s.gear === 0 ? 0 : 20 + 0.0003 * w * w);

  // Logs other than the start begin already running at the target speed.
  const w0 = (s.targetRpm(0) ?? 0) * RAD_PER_RPM;
  let th1 = 0,
    w1 = w0,
    th2 = 0,
    w2 = w0;
  let wFilt = w0,
    integ = 0;
  let prevTarget: number | null = null;
  let loadNm = 0;
  // The vehicle's inertia reaches the secondary through the (soft) driveline: it resists the
  // secondary's slow acceleration only (two 0.5 Hz low-pass stages), not the firing pulses.
  let acc1 = 0,
    acc2 = 0,
    w2prev = w0;
  const lpA = dt * 2 * Math.PI * 0.5;
  const deriv = (t1: number, v1: number, t2: number, v2: number, tStarter: number) => {
    const spring = k * (t1 - t2) + c * (v1 - v2);
    const a1 = (gasTorque(t1) + tStarter - friction1(v1) - spring) / v.j1;
    const a2 = (spring - drag2(v2) - loadNm) / v.j2;
    return [v1, a1, v2, a2] as const;
  };
  // Two seconds of settling before the log starts (none for a start from standstill).
  const preRoll = w0 > 0 ? Math.round(2 / dt) : 0;
  for (let i = -preRoll, o = 0; o < nOut; i++) {
    const t = Math.max(0, i * dt);
    if (i >= 0 && i % oversample === 0) {
      out.t[o] = t;
      // Pulse-counting sensors read exactly zero at standstill.
      out.w1[o] = w1 < RAD_PER_RPM ? 0 : w1 + 0.3 * RAD_PER_RPM * r.gauss();
      out.w2[o] = w2 < RAD_PER_RPM ? 0 : w2 + 0.3 * RAD_PER_RPM * r.gauss();
      o++;
    }
    // Speed controller on the low-passed crank speed (≈ 3 Hz): sets the combustion torque.
    wFilt += (w1 - wFilt) * Math.min(1, dt * 2 * Math.PI * 3);
    const target = s.targetRpm(t);
    const dTarget =
      target !== null && prevTarget !== null ? ((target - prevTarget) * RAD_PER_RPM) / dt : 0;
    prevTarget = target;
    acc1 += ((w2 - w2prev) / dt - acc1) * lpA;
    acc2 += (acc1 - acc2) * lpA;
    w2prev = w2;
    loadNm = jLoad * acc2;
    if (target !== null && s.fuel(t)) {
      const err = target * RAD_PER_RPM - wFilt;
      integ = Math.max(-30, Math.min(60, integ + 40 * err * dt)); // anti-windup
      const ff = friction1(wFilt) + drag2(wFilt) + (v.j1 + v.j2 + jLoad) * dTarget;
      const meanNm = Math.max(0, Math.min(v.fullLoadNm, ff + 4 * err + integ));
      burnNm = meanNm / (z * burnMeanPerUnit);
    } else {
      burnNm = 0;
      integ = 0;
    }
    const starterNm = s.starter(t) ? Math.max(0, 320 * (1 - w1 / (250 * RAD_PER_RPM))) : 0;
    const k1 = deriv(th1, w1, th2, w2, starterNm);
    const k2 = deriv(
      th1 + (dt / 2) * k1[0],
      w1 + (dt / 2) * k1[1],
      th2 + (dt / 2) * k1[2],
      w2 + (dt / 2) * k1[3],
      starterNm,
    );
    const k3 = deriv(
      th1 + (dt / 2) * k2[0],
      w1 + (dt / 2) * k2[1],
      th2 + (dt / 2) * k2[2],
      w2 + (dt / 2) * k2[3],
      starterNm,
    );
    const k4 = deriv(
      th1 + dt * k3[0],
      w1 + dt * k3[1],
      th2 + dt * k3[2],
      w2 + dt * k3[3],
      starterNm,
    );
    th1 += (dt / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]);
    w1 += (dt / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]);
    th2 += (dt / 6) * (k1[2] + 2 * k2[2] + 2 * k3[2] + k4[2]);
    w2 += (dt / 6) * (k1[3] + 2 * k2[3] + 2 * k3[3] + k4[3]);
    // A stopped engine does not turn backwards (the friction torque holds it).
    if (w1 < 0 && !s.fuel(t)) w1 = 0;
    if (w2 < 0 && !s.fuel(t)) w2 = 0;
  }
  return out;
}

const ramp = (t: number, t0: number, t1: number, a: number, b: number) =>
  t <= t0 ? a : t >= t1 ? b : a + ((b - a) * (t - t0)) / (t1 - t0);

function schedules(v: Vehicle): Record<string, Schedule> {
  const top = v.maxRpm;
  return {
    idle: {
      durationS: 20,
      gear: 0,
      starter: () => false,
      fuel: () => true,
      targetRpm: () => v.idleRpm,
    },
    runup: {
      durationS: 26,
      gear: 3,
      starter: () => false,
      fuel: () => true,
      targetRpm: (t) => ramp(t, 2, 24, 1100, top),
    },
    // Start test with the starter held and a gentle fuel ramp, so the damper resonance is
    // crossed over a few seconds; key-off at 20 s and a free stop.
    start: {
      durationS: 24,
      gear: 0,
      starter: (t) => t > 0.5 && t < 3,
      fuel: (t) => t > 2.5 && t < 20,
      targetRpm: (t) => (t > 2.5 && t < 20 ? ramp(t, 2.5, 8.5, 300, v.idleRpm) : null),
    },
  };
}

interface Format {
  header: string[];
  sep: string;
  decimalComma: boolean;
  timeMs: boolean;
  radS: boolean;
}

function writeCsv(
  file: string,
  f: Format,
  sim: ReturnType<typeof simulate>,
  gear: number,
  extra?: (t: number) => number,
) {
  const lines: string[] = [f.header.join(f.sep)];
  const num = (x: number, digits: number) => {
    const s = x.toFixed(digits);
    return f.decimalComma ? s.replace(".", ",") : s;
  };
  for (let i = 0; i < sim.t.length; i++) {
    const t = f.timeMs ? num(sim.t[i]! * 1000, 2) : num(sim.t[i]!, 5);
    const a = f.radS ? num(sim.w1[i]!, 4) : num(sim.w1[i]! / RAD_PER_RPM, 2);
    const b = f.radS ? num(sim.w2[i]!, 4) : num(sim.w2[i]! / RAD_PER_RPM, 2);
    const row = [t, a, b, String(gear)];
    if (extra) row.push(num(extra(sim.t[i]!), 1));
    lines.push(row.join(f.sep));
  }
  writeFileSync(join(OUT, file), lines.join("\n") + "\n");
}

const fmt = {
  plain: {
    header: ["time [s]", "crank speed [rpm]", "gearbox input speed [rpm]", "gear"],
    sep: ",",
    decimalComma: false,
    timeMs: false,
    radS: false,
  },
  semicolon: {
    header: ["time [s]", "crank speed [rpm]", "gearbox input speed [rpm]", "gear", "pedal [%]"],
    sep: ";",
    decimalComma: true,
    timeMs: false,
    radS: false,
  },
  radS: {
    header: ["time_s", "engine_speed_rad_s", "input_shaft_speed_rad_s", "gear", "pedal_pct"],
    sep: ",",
    decimalComma: false,
    timeMs: false,
    radS: true,
  },
  ms: {
    header: ["t_ms", "flywheel speed [rpm]", "transmission input speed [rpm]", "gear"],
    sep: ",",
    decimalComma: false,
    timeMs: true,
    radS: false,
  },
  primary: {
    header: ["time (s)", "primary speed (rpm)", "secondary speed (rpm)", "gear"],
    sep: "\t",
    decimalComma: false,
    timeMs: false,
    radS: false,
  },
} satisfies Record<string, Format>;

let seed = 2024;
const pedal = (t: number) => (t < 2 ? 20 : 100);
for (const v of VEHICLES) {
  const [a, b] = v.dampers;
  const s = schedules(v);
  const name = (what: string, d: Damper) =>
    `kestrel-${v.id.toLowerCase()}-${what}-damper-${d.name.toLowerCase()}.csv`;
  const d4 = v.id === "KST-D4";
  writeCsv(
    name("idle-neutral", a),
    d4 ? fmt.plain : fmt.primary,
    simulate(v, a, s.idle!, seed++),
    0,
  );
  writeCsv(
    name("runup-3rd-full-load", a),
    fmt.semicolon,
    simulate(v, a, s.runup!, seed++),
    3,
    pedal,
  );
  writeCsv(name("runup-3rd-full-load", b), fmt.radS, simulate(v, b, s.runup!, seed++), 3, pedal);
  writeCsv(name("engine-start", a), d4 ? fmt.ms : fmt.plain, simulate(v, a, s.start!, seed++), 0);
}
process.stdout.write(`wrote ${VEHICLES.length * 4} drive logs to ${OUT}\n`);
