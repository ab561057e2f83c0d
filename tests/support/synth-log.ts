/**
 * Analytic drive logs built in memory for the pipeline tests (never the demo samples): the crank
 * carries an order-q fluctuation on any speed profile, the gearbox input the same fluctuation
 * shaped by the base-excited two-mass transfer function H(r) = (1 + j2ζr)/(1 − r² + j2ζr)
 * (Harris' Shock and Vibration Handbook ch. 30; Ogata, System Dynamics, eq. 9-14), magnitude
 * and phase at the instantaneous firing frequency (quasi-static), computed by transferH in
 * ./analytic-log.ts, independently of the app. Speeds in rad/s, time in s.
 */
import type { DriveLog } from "../../app/lib/signal/types.ts";
import { transferH } from "./analytic-log.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;

export interface Synth {
  fs: number;
  durationS: number;
  rpmAt: (t: number) => number;
  order: number;
  /** 0-peak fluctuation amplitude, rpm, on the crank (or on the gearbox when gearboxFixed). */
  ampRpm: number;
  fnHz: number;
  zeta: number;
  noiseRpm?: number;
  gearboxFixed?: boolean;
  /** Speed-scale error of the gearbox sensor (1.0005 reads 0.05 % high). Default 1. */
  gearboxScale?: number;
}

export function synthLog(p: Synth): DriveLog {
  const n = Math.round(p.fs * p.durationS);
  const timeS = new Float64Array(n);
  const crank = new Float64Array(n);
  const gear = new Float64Array(n);
  let seed = 99;
  const noise = () => {
    seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
    return (p.noiseRpm ?? 0) * RAD_PER_RPM * (seed / 2 ** 32 - 0.5);
  };
  let theta = 0;
  for (let i = 0; i < n; i++) {
    const t = i / p.fs;
    timeS[i] = t;
    const w = p.rpmAt(t) * RAD_PER_RPM;
    if (i > 0) theta += (0.5 * (p.rpmAt(t - 1 / p.fs) * RAD_PER_RPM + w)) / p.fs;
    const h = transferH(((w / (2 * Math.PI)) * p.order) / p.fnHz, p.zeta);
    const a = p.ampRpm * RAD_PER_RPM;
    const crankAmp = p.gearboxFixed ? a / h.magnitude : a;
    crank[i] = w + crankAmp * Math.cos(p.order * theta) + noise();
    gear[i] =
      (p.gearboxScale ?? 1) *
        (w + crankAmp * h.magnitude * Math.cos(p.order * theta + h.phaseRad)) +
      noise();
  }
  return {
    timeS,
    crankRadS: crank,
    gearboxRadS: gear,
    extra: {},
    sampleRateHz: p.fs,
    source: {
      rows: n,
      delimiter: ",",
      decimal: ".",
      timeColumn: "t",
      crankColumn: "crank",
      gearboxColumn: "gearbox",
      timeUnit: "s",
      crankUnit: "rad/s",
      gearboxUnit: "rad/s",
    },
  };
}
