/**
 * The Vold–Kalman order filter on analytic signals built here: a linear run-up whose crank angle
 * is known in closed form (θ = ω0·t + a·t²/2) and whose order amplitude follows a known envelope.
 * Sources: Vold & Leuridan, SAE 931288 (1993) and Vold, Mains & Blough, SAE 972007 (1997) for the
 * data and structural equations; J. Tůma, ICSV12 (2005) for the passband relation
 * |H(Δf)| = 1/(1 + r²·(2 − 2cos(2πΔf/fs))^p) [equation number from memory].
 */
import { describe, expect, it } from "vitest";
import {
  passbandGain,
  voldKalmanLowpass,
  voldKalmanOrder,
  voldKalmanSpeedOrders,
  weightSquaredForBandwidth,
  type OrderEnvelope,
} from "./vold-kalman.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;
const PHASE = 0.7;

/** 1000 → 6000 rpm in 5 s, order 2 with envelope 1 + 0.5·sin(2π·0.4·t) rad/s, optional mean speed. */
function runUp(fs: number, withMean = false) {
  const durationS = 5;
  const n = Math.round(fs * durationS) + 1;
  const w0 = 1000 * RAD_PER_RPM;
  const slope = (5000 * RAD_PER_RPM) / durationS;
  const timeS = new Float64Array(n);
  const angle = new Float64Array(n);
  const shaft = new Float64Array(n);
  const signal = new Float64Array(n);
  const envelope = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    timeS[i] = t;
    shaft[i] = w0 + slope * t;
    angle[i] = w0 * t + 0.5 * slope * t * t;
    envelope[i] = 1 + 0.5 * Math.sin(2 * Math.PI * 0.4 * t);
    signal[i] = (withMean ? shaft[i]! : 0) + envelope[i]! * Math.cos(2 * angle[i]! + PHASE);
  }
  return { timeS, angle, shaft, signal, envelope, fs, n, durationS };
}

type RunUp = ReturnType<typeof runUp>;

/** Largest relative amplitude error and phase error at least one 1/Δf₃ from either end. */
function worstAwayFromEnds(r: RunUp, e: OrderEnvelope, bandwidthOrders = 0.2) {
  let amp = 0;
  let phase = 0;
  let checked = 0;
  for (let i = 0; i < r.n; i++) {
    const bwHz = (bandwidthOrders * r.shaft[i]!) / (2 * Math.PI);
    const t = r.timeS[i]!;
    if (Math.min(t, r.durationS - t) * bwHz < 1) continue;
    amp = Math.max(amp, Math.abs(e.amplitude[i]! / r.envelope[i]! - 1));
    phase = Math.max(phase, Math.abs(Math.atan2(e.im[i]!, e.re[i]!) - PHASE));
    checked++;
  }
  return { amp, phase, checked };
}

function order2(r: RunUp, signal = r.signal) {
  return voldKalmanOrder({
    signal,
    angleRad: r.angle,
    shaftRadS: r.shaft,
    order: 2,
    sampleRateHz: r.fs,
  });
}

describe("run-up with a known envelope (default bandwidth 0.2 orders, 2 poles)", () => {
  it("recovers the order-2 amplitude within 1 % and its phase within 0.01 rad one 1/Δf₃ from the ends (analytic envelope)", () => {
    const r = runUp(5000);
    const w = worstAwayFromEnds(r, order2(r));
    expect(w.checked).toBeGreaterThan(0.9 * r.n);
    // Analytic: 0-peak amplitude = the envelope, phase = PHASE (signal built above).
    expect(w.amp).toBeLessThan(0.01);
    expect(w.phase).toBeLessThan(0.01);
  });

  it("the ends reach less than 0.3/Δf₃: within 1 % from there on, up to 10 % at the first and last sample", () => {
    const r = runUp(5000);
    const e = order2(r);
    let inner = 0;
    let edge = 0;
    for (let i = 0; i < r.n; i++) {
      const err = Math.abs(e.amplitude[i]! / r.envelope[i]! - 1);
      const t = r.timeS[i]!;
      const bwHz = (0.2 * r.shaft[i]!) / (2 * Math.PI);
      if (Math.min(t, r.durationS - t) * bwHz >= 0.3) inner = Math.max(inner, err);
      else edge = Math.max(edge, err);
    }
    // Analytic envelope; measured 0.2/Δf₃ for the 1 % crossing, 8.9 % at t = 0 (a curved
    // envelope against the end of the data; a straight one is kept exactly there too).
    expect(inner).toBeLessThan(0.01);
    expect(edge).toBeLessThan(0.1);
  });
});

describe("passband (Tůma 2005 relation; Vold, Mains & Blough 1997)", () => {
  const fs = 2000;
  const rpm = 1200;
  const shaftRadS = rpm * RAD_PER_RPM;
  const bwHz = 2;

  /** Order 2 plus a second tone Δf above it, both amplitude 1, constant speed; 40 s. */
  function twoTones(offsetHz: number) {
    const n = 40 * fs;
    const angle = new Float64Array(n);
    const shaft = new Float64Array(n).fill(shaftRadS);
    const signal = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const t = i / fs;
      angle[i] = shaftRadS * t;
      signal[i] = Math.cos(2 * angle[i]!) + Math.cos(2 * angle[i]! + 2 * Math.PI * offsetHz * t);
    }
    const e = voldKalmanOrder({
      signal,
      angleRad: angle,
      shaftRadS: shaft,
      order: 2,
      sampleRateHz: fs,
      options: { bandwidthHz: bwHz },
    });
    // The order's own part is exactly 1/2 (a constant envelope satisfies the structural equation),
    // so what is left of 2x − 1 is the second tone through the filter: |H(Δf)|, away from the ends.
    let lo = Infinity;
    let hi = 0;
    for (let i = n / 4; i < (3 * n) / 4; i++) {
      const leak = Math.hypot(2 * e.re[i]! - 1, 2 * e.im[i]!);
      lo = Math.min(lo, leak);
      hi = Math.max(hi, leak);
    }
    return { lo, hi };
  }

  const tuma = (offsetHz: number, p: number) => {
    const c = 2 - 2 * Math.cos((2 * Math.PI * bwHz) / fs);
    const r2 = (Math.SQRT2 - 1) / c ** p;
    const d = 2 - 2 * Math.cos((2 * Math.PI * offsetHz) / fs);
    return 1 / (1 + r2 * d ** p);
  };

  it("weightSquaredForBandwidth and passbandGain are the published relation (to 1e-9)", () => {
    for (const p of [1, 2, 3])
      for (const off of [0.5, 2, 5]) {
        const g = passbandGain(off, weightSquaredForBandwidth(bwHz, fs, p), fs, p);
        expect(Math.abs(g - tuma(off, p))).toBeLessThan(1e-9);
      }
  });

  it("the −3 dB point is at the set bandwidth: |H(Δf₃)| = 1/√2 (definition of Δf₃ in the relation)", () => {
    const g = passbandGain(bwHz, weightSquaredForBandwidth(bwHz, fs, 2), fs, 2);
    expect(Math.abs(20 * Math.log10(g) + 3.0103)).toBeLessThan(1e-6);
    const m = twoTones(bwHz);
    expect(Math.abs(m.hi - Math.SQRT1_2)).toBeLessThan(2e-3);
    expect(Math.abs(m.lo - Math.SQRT1_2)).toBeLessThan(2e-3);
  });

  for (const offsetHz of [0.5, 1, 4, 10]) {
    it(`a second order ${offsetHz} Hz away leaks by |H| of the relation within 2e-3 (Tůma 2005)`, () => {
      const m = twoTones(offsetHz);
      const expected = tuma(offsetHz, 2);
      expect(Math.abs(m.hi - expected)).toBeLessThan(2e-3);
      expect(Math.abs(m.lo - expected)).toBeLessThan(2e-3);
    });
  }

  it("orders 2 and 2.5 at 1200 rpm with 0.1 orders: the neighbour is cut to −48 dB (relation: |H| = 0.0038)", () => {
    // Δf = 0.5 order × 20 Hz = 10 Hz, Δf₃ = 0.1 × 20 Hz = 2 Hz: 1/(1 + 0.414·(10/2)^4) ≈ 0.0038.
    const n = 20 * fs;
    const angle = Float64Array.from({ length: n }, (_, i) => (shaftRadS * i) / fs);
    const signal = angle.map((a) => Math.cos(2 * a) + Math.cos(2.5 * a));
    const e = voldKalmanOrder({
      signal,
      angleRad: angle,
      shaftRadS: new Float64Array(n).fill(shaftRadS),
      order: 2,
      sampleRateHz: fs,
      options: { bandwidthOrders: 0.1 },
    });
    const expected = passbandGain(10, weightSquaredForBandwidth(2, fs, 2), fs, 2);
    expect(Math.abs(expected - 0.0038)).toBeLessThan(1e-4);
    let hi = 0;
    for (let i = n / 4; i < (3 * n) / 4; i++)
      hi = Math.max(hi, Math.hypot(2 * e.re[i]! - 1, 2 * e.im[i]!));
    expect(Math.abs(hi - expected)).toBeLessThan(5e-4);
  });
});

describe("sampling rate and numerical range", () => {
  it("the same run-up at 1000, 2000 and 5000 Hz gives the same envelope within 0.1 % (bandwidth set in Hz, not in samples)", () => {
    const runs = [1000, 2000, 5000].map((fs) => {
      const r = runUp(fs);
      return { r, e: order2(r) };
    });
    let worst = 0;
    // Common instants: every millisecond is a sample of all three; the ends (1/Δf₃) left out.
    for (let ms = 300; ms <= 4950; ms++) {
      const a = runs.map(({ r, e }) => e.amplitude[Math.round((ms / 1000) * r.fs)]!);
      worst = Math.max(worst, Math.abs(a[0]! / a[2]! - 1), Math.abs(a[1]! / a[2]! - 1));
    }
    // The discrete relation differs from rate to rate only by 4sin²(πΔf/fs) vs (2πΔf/fs)²:
    // 0.1 % of r² at 20 Hz and 1 kHz.
    expect(worst).toBeLessThan(1e-3);
  });

  for (const [fs, bwHz] of [
    [5000, 0.3],
    [20000, 0.3],
    [50000, 0.3],
  ] as const) {
    it(`r² = ${weightSquaredForBandwidth(bwHz, fs, 2).toExponential(0)} (${bwHz} Hz at ${fs} Hz) still gives |H| of the relation within 1e-5`, () => {
      // A constant-speed tone 0.7·Δf₃ off the order line: its steady-state gain is the relation.
      const n = Math.round(fs * 40);
      const offset = 0.7 * bwHz;
      const angle = new Float64Array(n);
      const signal = new Float64Array(n);
      const shaftRadS = 2 * Math.PI * 20;
      for (let i = 0; i < n; i++) {
        const t = i / fs;
        angle[i] = shaftRadS * t;
        signal[i] = Math.cos(2 * angle[i]! + 2 * Math.PI * offset * t);
      }
      const e = voldKalmanOrder({
        signal,
        angleRad: angle,
        shaftRadS: new Float64Array(n).fill(shaftRadS),
        order: 2,
        sampleRateHz: fs,
        options: { bandwidthHz: bwHz },
      });
      const expected = passbandGain(offset, weightSquaredForBandwidth(bwHz, fs, 2), fs, 2);
      let worst = 0;
      for (let i = Math.floor(n / 3); i < (2 * n) / 3; i++)
        worst = Math.max(worst, Math.abs(e.amplitude[i]! - expected));
      expect(worst).toBeLessThan(1e-5);
    });
  }
});

describe("speed channel with its mean speed (trend removal)", () => {
  it("with the trend (voldKalmanLowpass) subtracted first the envelope is within 1 % away from the ends", () => {
    const r = runUp(5000, true);
    const trend = voldKalmanLowpass({ signal: r.signal, shaftRadS: r.shaft, sampleRateHz: r.fs });
    const w = worstAwayFromEnds(
      r,
      order2(
        r,
        r.signal.map((v, i) => v - trend[i]!),
      ),
    );
    expect(w.amp).toBeLessThan(0.01);
    expect(w.phase).toBeLessThan(0.01);
  });

  it("voldKalmanSpeedOrders (one factorisation for trend and envelope of both channels) equals the separate calls to 1e-12", () => {
    const r = runUp(2000, true);
    const other = r.signal.map((v, i) => 0.5 * v + 0.1 * Math.sin(3 * r.angle[i]!));
    const [a, b] = voldKalmanSpeedOrders({
      channels: [r.signal, other],
      angleRad: r.angle,
      shaftRadS: r.shaft,
      order: 2,
      sampleRateHz: r.fs,
    });
    for (const [x, got] of [
      [r.signal, a!],
      [other, b!],
    ] as const) {
      const trend = voldKalmanLowpass({ signal: x, shaftRadS: r.shaft, sampleRateHz: r.fs });
      const want = order2(
        r,
        x.map((v, i) => v - trend[i]!),
      );
      let worst = 0;
      for (let i = 0; i < r.n; i++)
        worst = Math.max(
          worst,
          Math.abs(got.re[i]! - want.re[i]!),
          Math.abs(got.im[i]! - want.im[i]!),
        );
      expect(worst).toBeLessThan(1e-12);
    }
  });

  it("without it the mean speed (100–630 rad/s, 2 orders away) leaks far beyond 1 % (why the removal is documented)", () => {
    const r = runUp(5000, true);
    expect(worstAwayFromEnds(r, order2(r)).amp).toBeGreaterThan(0.1);
  });

  it("a straight speed ramp is all trend: the low-pass returns it exactly (p = 2 keeps straight lines)", () => {
    const r = runUp(2000);
    const out = voldKalmanLowpass({ signal: r.shaft, shaftRadS: r.shaft, sampleRateHz: r.fs });
    let worst = 0;
    for (let i = 0; i < r.n; i++) worst = Math.max(worst, Math.abs(out[i]! - r.shaft[i]!));
    // A line has zero second difference: it is the exact least-squares solution (1e-6 rad/s of 630).
    expect(worst).toBeLessThan(1e-6);
  });
});

describe("options", () => {
  it("refuses bad poles and bandwidths (RangeError, callers validate first)", () => {
    const x = new Float64Array(10);
    const call = (options: object) =>
      voldKalmanOrder({
        signal: x,
        angleRad: x,
        shaftRadS: x,
        order: 2,
        sampleRateHz: 100,
        options,
      });
    expect(() => call({ poles: 4 })).toThrow(RangeError);
    expect(() => call({ bandwidthHz: 0 })).toThrow(RangeError);
    expect(() => call({ bandwidthOrders: -1 })).toThrow(RangeError);
  });
});
