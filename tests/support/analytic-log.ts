/**
 * Analytic drive logs for the pipeline tests, written as CSV text (never the demo samples).
 * The crank carries an order-q fluctuation of known 0-peak amplitude at a constant mean speed;
 * the gearbox input carries the same fluctuation shaped by the base-excited two-mass transfer
 * function H(r) = (1 + j2ζr) / (1 − r² + j2ζr), r = ω/ωn (Harris' Shock and Vibration
 * Handbook ch. 30; Ogata, System Dynamics, eq. 9-14), computed here independently of the app.
 */
export interface AnalyticIdle {
  rpm: number;
  order: number;
  crankAmpRpm: number;
  naturalHz: number;
  zeta: number;
  durationS: number;
  sampleRateHz: number;
}

export function transferH(r: number, zeta: number): { magnitude: number; phaseRad: number } {
  // (a + jb) / (c + jd)
  const a = 1;
  const b = 2 * zeta * r;
  const c = 1 - r * r;
  const d = 2 * zeta * r;
  const den = c * c + d * d;
  const re = (a * c + b * d) / den;
  const im = (b * c - a * d) / den;
  return { magnitude: Math.hypot(re, im), phaseRad: Math.atan2(im, re) };
}

/** Expected isolation at the order, dB: 20·log10(crank / gearbox) = −20·log10|H| (ISO 80000-3 level of a field quantity). */
export function expectedIsolationDb(p: AnalyticIdle): number {
  const r = ((p.rpm / 60) * p.order) / p.naturalHz;
  return -20 * Math.log10(transferH(r, p.zeta).magnitude);
}

export function analyticIdleCsv(p: AnalyticIdle): string {
  const n = Math.round(p.durationS * p.sampleRateHz);
  const omega = (p.rpm * 2 * Math.PI) / 60;
  const r = ((p.rpm / 60) * p.order) / p.naturalHz;
  const h = transferH(r, p.zeta);
  const lines = ["time [s],crank speed [rpm],gearbox input speed [rpm]"];
  for (let i = 0; i < n; i++) {
    const t = i / p.sampleRateHz;
    const phase = p.order * omega * t;
    const crank = p.rpm + p.crankAmpRpm * Math.cos(phase);
    const gearbox = p.rpm + p.crankAmpRpm * h.magnitude * Math.cos(phase + h.phaseRad);
    lines.push(`${t.toFixed(5)},${crank.toFixed(4)},${gearbox.toFixed(4)}`);
  }
  return lines.join("\n") + "\n";
}

/** The idle log the pipeline tests share: 800 rpm, order 2, 10 rpm on the crank, fn 12 Hz, ζ 0.1. */
export const IDLE_800: AnalyticIdle = {
  rpm: 800,
  order: 2,
  crankAmpRpm: 10,
  naturalHz: 12,
  zeta: 0.1,
  durationS: 12,
  sampleRateHz: 2000,
};
