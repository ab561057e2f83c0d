/**
 * Two-mass torsional model (primary, spring k and damper c, secondary J2) seen as a base-excited
 * single-degree-of-freedom system: the crank-side motion is imposed, the secondary follows.
 *
 * H(ω) = (k + jωc)/(k − J2ω² + jωc) = (1 + j2ζr)/(1 − r² + j2ζr), r = ω/ωn, ωn = √(k/J2),
 * ζ = c/(2√(k·J2)); |H| is the transmissibility
 * T(r) = √((1 + (2ζr)²)/((1 − r²)² + (2ζr)²))
 * (Harris' Shock and Vibration Handbook, ch. 30; K. Ogata, System Dynamics, 4th ed., eq. 9-14).
 * The ratio of secondary to primary speed fluctuation is H whatever drives the primary, so the
 * ωn this file fits is √(k/J2) — the frequency of least isolation — not the free-free frequency
 * √(k(J1+J2)/(J1·J2)) at which both sides swing most.
 */
import { orderFrequencyHz } from "./firing-order.ts";
import { countText } from "../base/plural.ts";

/** Transmissibility |H| (dimensionless) at frequency ratio r ≥ 0 and damping ratio ζ ≥ 0. */
export function transmissibility(r: number, zeta: number): number {
  const d = 2 * zeta * r;
  const a = 1 - r * r;
  return Math.sqrt((1 + d * d) / (a * a + d * d));
}

/** Complex H(r) = (1 + j2ζr)/(1 − r² + j2ζr) as magnitude and phase (rad, secondary lag < 0). */
export function transferFunction(r: number, zeta: number): { magnitude: number; phaseRad: number } {
  const d = 2 * zeta * r;
  const a = 1 - r * r;
  return { magnitude: transmissibility(r, zeta), phaseRad: Math.atan2(d, 1) - Math.atan2(d, a) };
}

/** Predicted isolation in dB (positive = attenuation): −20·log10 T at order `order`, `rpm`. */
export function modelIsolationDb(
  rpm: number,
  order: number,
  naturalFrequencyHz: number,
  dampingRatio: number,
): number {
  const r = orderFrequencyHz(rpm, order) / naturalFrequencyHz;
  return -20 * Math.log10(transmissibility(r, dampingRatio));
}

export interface ModelFit {
  naturalFrequencyHz: number;
  dampingRatio: number;
  /** Root-mean-square of measured − model isolation over the fitted bins, dB. */
  rmsErrorDb: number;
  /** Number of rpm bins the fit used. */
  bins: number;
}

/** Why a fit was refused, in a technician's words. */
export type ModelFitOutcome = { ok: true; fit: ModelFit } | { ok: false; reason: string };

export const MODEL_FIT_LIMITS = {
  /** Fewer bins than this cannot pin two parameters against noise. */
  minBins: 6,
  /** Highest / lowest bin speed must span at least this ratio. */
  minSpanRatio: 1.5,
  /** The lowest measured firing frequency must lie within this many ωn (the knee of the curve). */
  maxLowestR: 3,
  /** A fit with a larger RMS error does not describe the damper. */
  maxRmsErrorDb: 3,
  zetaMin: 0.005,
  zetaMax: 1,
};

function rmsError(
  points: readonly { rpm: number; dB: number }[],
  order: number,
  fn: number,
  z: number,
) {
  let sum = 0;
  for (const p of points) {
    const e = p.dB - modelIsolationDb(p.rpm, order, fn, z);
    sum += e * e;
  }
  return Math.sqrt(sum / points.length);
}

/**
 * Least-squares fit (in dB, over rpm bins) of ωn and ζ to a measured isolation curve at `order`.
 * Method: a log-spaced grid over ωn and ζ, then a shrinking pattern search in log space.
 */
export function fitTwoMassModel(
  points: readonly { rpm: number; dB: number }[],
  order: number,
): ModelFitOutcome {
  const lim = MODEL_FIT_LIMITS;
  const usable = points.filter((p) => Number.isFinite(p.dB) && p.rpm > 0);
  if (usable.length < lim.minBins) {
    return {
      ok: false,
      reason: `only ${countText(usable.length, "engine-speed bin")} with isolation; the fit needs ${lim.minBins}`,
    };
  }
  const rpms = usable.map((p) => p.rpm);
  const lo = Math.min(...rpms);
  const hi = Math.max(...rpms);
  if (hi / lo < lim.minSpanRatio) {
    return {
      ok: false,
      reason: `the log spans ${lo.toFixed(0)}–${hi.toFixed(0)} rpm, too narrow to fit the damper`,
    };
  }
  const fLo = orderFrequencyHz(lo, order);
  const fHi = orderFrequencyHz(hi, order);
  const fnMin = fLo / 30;
  const fnMax = fHi;
  let best = { lf: 0, lz: 0, e: Infinity };
  const nf = 80;
  const nz = 24;
  for (let i = 0; i < nf; i++) {
    const lf = Math.log(fnMin) + (i / (nf - 1)) * Math.log(fnMax / fnMin);
    for (let j = 0; j < nz; j++) {
      const lz = Math.log(lim.zetaMin) + (j / (nz - 1)) * Math.log(lim.zetaMax / lim.zetaMin);
      const e = rmsError(usable, order, Math.exp(lf), Math.exp(lz));
      if (e < best.e) best = { lf, lz, e };
    }
  }
  let step = { f: Math.log(fnMax / fnMin) / nf, z: Math.log(lim.zetaMax / lim.zetaMin) / nz };
  for (let iter = 0; iter < 200 && (step.f > 1e-7 || step.z > 1e-7); iter++) {
    let improved = false;
    for (const [df, dz] of [
      [1, 0],
      [-1, 0],
      [0, 1],
      [0, -1],
      [1, 1],
      [-1, -1],
      [1, -1],
      [-1, 1],
    ] as const) {
      const lf = best.lf + df * step.f;
      const lz = Math.min(
        Math.log(lim.zetaMax),
        Math.max(Math.log(lim.zetaMin), best.lz + dz * step.z),
      );
      const e = rmsError(usable, order, Math.exp(lf), Math.exp(lz));
      if (e < best.e) {
        best = { lf, lz, e };
        improved = true;
      }
    }
    if (!improved) step = { f: step.f / 2, z: step.z / 2 };
  }
  const fn = Math.exp(best.lf);
  const zeta = Math.exp(best.lz);
  if (fn <= fnMin * 1.05) {
    return {
      ok: false,
      reason: "the isolation curve does not bend towards a resonance inside the measured range",
    };
  }
  if (fLo / fn > lim.maxLowestR) {
    return {
      ok: false,
      reason: `the log starts ${(fLo / fn).toFixed(1)}× above the fitted resonance; it needs data within ${lim.maxLowestR}× to pin it`,
    };
  }
  if (best.e > lim.maxRmsErrorDb) {
    return {
      ok: false,
      reason: `the two-mass model misses the measured curve by ${best.e.toFixed(1)} dB RMS`,
    };
  }
  return {
    ok: true,
    fit: { naturalFrequencyHz: fn, dampingRatio: zeta, rmsErrorDb: best.e, bins: usable.length },
  };
}
