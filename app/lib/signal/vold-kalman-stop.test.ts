/**
 * The Vold–Kalman filter through a damper resonance in an analytic engine stop (the issue's
 * three-cylinder case: 800 → 200 rpm in 3 s, firing order 1.5, resonance at 445 rpm, ζ = 0.1).
 * The gearbox carries the crank's firing order shaped by the base-excited two-mass transfer
 * function H(r) = (1 + j2ζr)/(1 − r² + j2ζr) at the instantaneous firing frequency (Harris'
 * Shock and Vibration Handbook ch. 30; Ogata eq. 9-14), as the analyse tests build it.
 */
import { describe, expect, it } from "vitest";
import { integrateAngle } from "./angle-grid.ts";
import { transferFunction, transmissibility } from "./two-mass-model.ts";
import { VOLD_KALMAN_EVENT_OPTIONS, voldKalmanSpeedOrders } from "./vold-kalman.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;
const Q = 1.5;
const RES_RPM = 445;
const FN_HZ = (RES_RPM * Q) / 60;
const ZETA = 0.1;
const FS = 2000;

/** Idle 800 rpm for 1 s, down to 200 rpm over 3 s (223 rpm/s at 445 rpm), 1 s at 200 rpm. */
const rpmAt = (t: number) => (t < 1 ? 800 : t < 4 ? 200 + 600 * (1 - (t - 1) / 3) ** 1.5 : 200);

function stop() {
  const n = 5 * FS;
  const timeS = new Float64Array(n);
  const crank = new Float64Array(n);
  const gear = new Float64Array(n);
  let theta = 0;
  for (let i = 0; i < n; i++) {
    const t = i / FS;
    timeS[i] = t;
    const w = rpmAt(t) * RAD_PER_RPM;
    if (i > 0) theta += (0.5 * (w + rpmAt(t - 1 / FS) * RAD_PER_RPM)) / FS;
    const h = transferFunction((Q * rpmAt(t)) / 60 / FN_HZ, ZETA);
    const a = 10 * RAD_PER_RPM;
    crank[i] = w + a * Math.cos(Q * theta);
    gear[i] = w + a * h.magnitude * Math.cos(Q * theta + h.phaseRad);
  }
  return { timeS, crank, gear, n };
}

function isolation(options = VOLD_KALMAN_EVENT_OPTIONS) {
  const s = stop();
  const [c, g] = voldKalmanSpeedOrders({
    channels: [s.crank, s.gear],
    angleRad: integrateAngle(s.timeS, s.crank),
    shaftRadS: s.crank,
    order: Q,
    sampleRateHz: FS,
    options,
  });
  let worstDb = 0;
  let peakDb = -Infinity;
  let peakRpm = 0;
  // The decay, away from the record's ends and from the corners of the speed profile.
  for (let i = 1.2 * FS; i < 3.9 * FS; i++) {
    const rpm = rpmAt(i / FS);
    const db = 20 * Math.log10(g!.amplitude[i]! / c!.amplitude[i]!);
    if (db > peakDb) [peakDb, peakRpm] = [db, rpm];
    const formula = 20 * Math.log10(transmissibility((Q * rpm) / 60 / FN_HZ, ZETA));
    if (rpm >= 0.7 * RES_RPM && rpm <= 1.5 * RES_RPM)
      worstDb = Math.max(worstDb, Math.abs(db - formula));
  }
  return { worstDb, peakRpm };
}

describe("engine stop through the damper resonance (event options, 0.3 orders)", () => {
  it("amplification within 1 dB of 20·log10 T(r) from 0.7× to 1.5× the resonance speed", () => {
    // Measured 0.47 dB; the default 0.2 orders gives 1.13 dB (the peak smoothed).
    expect(isolation().worstDb).toBeLessThan(1);
  });

  it("the speed of least isolation within 5 % of the formula's peak (r = 0.990 for ζ = 0.1: 441 rpm)", () => {
    // Peak of T(r) for base excitation: r² = (√(1 + 8ζ²) − 1)/(4ζ²), from dT/dr = 0 [computed].
    const r = Math.sqrt((Math.sqrt(1 + 8 * ZETA ** 2) - 1) / (4 * ZETA ** 2));
    const formulaRpm = r * RES_RPM;
    expect(Math.abs(formulaRpm - 441)).toBeLessThan(1);
    expect(Math.abs(isolation().peakRpm / formulaRpm - 1)).toBeLessThan(0.05);
  });
});
