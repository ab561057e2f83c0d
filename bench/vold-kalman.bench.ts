/**
 * `npm run bench` (part): speed of the transient methods on one million samples of an analytic
 * two-channel log (5 kHz, 200 s, the engine swinging between 800 and 6000 rpm): the Vold–Kalman
 * order filter for one order on both channels, without and with the trend removal a speed channel
 * needs (four calls, and voldKalmanSpeedOrders sharing one factorisation), and the adaptive
 * blocks over the whole log. Prints the median of 3 runs per figure.
 */
import { adaptiveBlocks } from "../app/lib/signal/adaptive-blocks.ts";
import { chooseAngleGrid, integrateAngle } from "../app/lib/signal/angle-grid.ts";
import {
  voldKalmanLowpass,
  voldKalmanOrder,
  voldKalmanSpeedOrders,
} from "../app/lib/signal/vold-kalman.ts";

const RATE_HZ = 5000;
const SAMPLES = 1_000_000;
const RUNS = 3;
const RAD_PER_RPM = (2 * Math.PI) / 60;
const Q = 2;

const timeS = new Float64Array(SAMPLES);
const crank = new Float64Array(SAMPLES);
const gearbox = new Float64Array(SAMPLES);
let theta = 0;
for (let i = 0; i < SAMPLES; i++) {
  const t = i / RATE_HZ;
  timeS[i] = t;
  // 20 s cycles: 800 → 6000 rpm and back (slews up to 800 rpm/s).
  const w = (3400 - 2600 * Math.cos((2 * Math.PI * t) / 20)) * RAD_PER_RPM;
  if (i > 0) theta += w / RATE_HZ;
  crank[i] = w + 0.5 * Math.cos(Q * theta);
  gearbox[i] = w + 0.1 * Math.cos(Q * theta - 2.5);
}
const angle = integrateAngle(timeS, crank);

function median(f: () => void): number {
  const ms: number[] = [];
  for (let r = 0; r < RUNS; r++) {
    const t0 = performance.now();
    f();
    ms.push(performance.now() - t0);
  }
  return ms.sort((a, b) => a - b)[Math.floor(RUNS / 2)]!;
}

const order = (signal: Float64Array) =>
  voldKalmanOrder({ signal, angleRad: angle, shaftRadS: crank, order: Q, sampleRateHz: RATE_HZ });
const withTrend = (signal: Float64Array) => {
  const trend = voldKalmanLowpass({ signal, shaftRadS: crank, sampleRateHz: RATE_HZ });
  return order(signal.map((v, i) => v - trend[i]!));
};
const speedOrders = () =>
  voldKalmanSpeedOrders({
    channels: [crank, gearbox],
    angleRad: angle,
    shaftRadS: crank,
    order: Q,
    sampleRateHz: RATE_HZ,
  });
const perMillion = (ms: number) => (ms * 1e6) / SAMPLES;

const plain = median(() => {
  order(crank);
  order(gearbox);
});
const trended = median(() => {
  withTrend(crank);
  withTrend(gearbox);
});
const shared = median(speedOrders);
const grid = chooseAngleGrid({
  sampleRateHz: RATE_HZ,
  maxRadS: 6000 * RAD_PER_RPM,
  topOrder: 4 * Q,
});
let blocks = 0;
const adaptive = median(() => {
  blocks = adaptiveBlocks({
    timeS,
    angleRad: angle,
    crankRadS: crank,
    gearboxRadS: gearbox,
    grid,
    order: Q,
    spans: [{ startIndex: 0, endIndex: SAMPLES }],
    maxRevs: 8,
  }).length;
});

console.log(`\ntransient methods on ${SAMPLES.toLocaleString("en")} samples at ${RATE_HZ} Hz`);
console.log(
  `  Vold–Kalman, one order, both channels      ${perMillion(plain).toFixed(0).padStart(5)} ms per million samples`,
);
console.log(
  `  the same with the trend removed first      ${perMillion(trended).toFixed(0).padStart(5)} ms per million samples`,
);
console.log(
  `  the same through voldKalmanSpeedOrders     ${perMillion(shared).toFixed(0).padStart(5)} ms per million samples (one factorisation)`,
);
console.log(
  `  adaptive blocks, both channels (${blocks} blocks) ${perMillion(adaptive).toFixed(0).padStart(5)} ms per million samples`,
);
