/**
 * Twist between crank and gearbox input on analytic signals built here. The source of every
 * expected value is the derivative of a sinusoid: a speed fluctuation D·cos(2πft + ψ) integrates
 * to an angle of amplitude D/(2πf), so crank C and gearbox G (complex 0-peak amplitudes, same
 * phase reference) twist by |C − G|/(2πf) rad.
 */
import { describe, expect, it } from "vitest";
import { chooseAngleGrid, integrateAngle } from "./angle-grid.ts";
import { trackBlocks } from "./order-tracking.ts";
import { peakToPeak, relativeTwistDeg, twistAmplitudeDeg, twistCurve } from "./twist.ts";
import { voldKalmanLowpass, voldKalmanOrder } from "./vold-kalman.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;
const DEG = 180 / Math.PI;

/** Constant speed, firing order q on both channels: crank C·cos(qθ), gearbox G·cos(qθ + φ). */
function steady(p: { fs: number; rpm: number; q: number; c: number; g: number; phi: number }) {
  const n = 20 * p.fs;
  const w = p.rpm * RAD_PER_RPM;
  const timeS = new Float64Array(n);
  const crank = new Float64Array(n);
  const gear = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / p.fs;
    timeS[i] = t;
    crank[i] = w + p.c * Math.cos(p.q * w * t);
    gear[i] = w + p.g * Math.cos(p.q * w * t + p.phi);
  }
  const orderHz = (p.q * w) / (2 * Math.PI);
  // |C − G·e^{jφ}| / (2πf), in degrees: the analytic twist amplitude.
  const expectedDeg =
    (Math.hypot(p.c - p.g * Math.cos(p.phi), p.g * Math.sin(p.phi)) / (2 * Math.PI * orderHz)) *
    DEG;
  return { timeS, crank, gear, w, orderHz, expectedDeg, ...p };
}

const cases = [
  { fs: 2000, rpm: 1500, q: 2, c: 3, g: 0.6, phi: -2.4 },
  { fs: 2000, rpm: 800, q: 1.5, c: 4, g: 2.5, phi: -0.9 },
  { fs: 5000, rpm: 3000, q: 3, c: 1, g: 0.9, phi: -0.2 },
];

describe("firing-order twist amplitude (analytic |C − G|/(2πf))", () => {
  for (const p of cases) {
    const s = steady(p);
    it(`blocks (trackBlocks firingBin → twistCurve), ${p.rpm} rpm order ${p.q}: within 1 % of ${s.expectedDeg.toFixed(3)}°`, () => {
      const R = 8;
      const grid = chooseAngleGrid({ sampleRateHz: p.fs, maxRadS: s.w * 1.05, topOrder: 4 * p.q });
      const tracked = trackBlocks({
        timeS: s.timeS,
        angleRad: integrateAngle(s.timeS, s.crank),
        crankRadS: s.crank,
        gearboxRadS: s.gear,
        grid,
        revsPerBlock: R,
        overlap: 0.5,
        topBin: 4 * p.q * R + 2,
        firingBin: p.q * R,
      });
      const curve = twistCurve(tracked, p.q, 50);
      const at = curve.find((x) => x.rpm === p.rpm);
      expect(at?.blocks).toBeGreaterThan(10);
      expect(Math.abs(at!.deg / s.expectedDeg - 1)).toBeLessThan(0.01);
    });

    it(`Vold–Kalman envelopes → twistAmplitudeDeg, ${p.rpm} rpm order ${p.q}: within 1 %`, () => {
      const angle = integrateAngle(s.timeS, s.crank);
      const env = (x: Float64Array) => {
        const trend = voldKalmanLowpass({ signal: x, shaftRadS: s.crank, sampleRateHz: p.fs });
        return voldKalmanOrder({
          signal: x.map((v, i) => v - trend[i]!),
          angleRad: angle,
          shaftRadS: s.crank,
          order: p.q,
          sampleRateHz: p.fs,
        });
      };
      const c = env(s.crank);
      const g = env(s.gear);
      let worst = 0;
      for (let i = 5 * p.fs; i < 15 * p.fs; i += 97) {
        // The envelope x is half the complex 0-peak amplitude (A·cos reads x = A/2·e^{jφ}).
        const deg = twistAmplitudeDeg(
          { re: 2 * c.re[i]!, im: 2 * c.im[i]! },
          { re: 2 * g.re[i]!, im: 2 * g.im[i]! },
          s.orderHz,
        );
        worst = Math.max(worst, Math.abs(deg / s.expectedDeg - 1));
      }
      expect(worst).toBeLessThan(0.01);
    });
  }

  it("trackBlocks without firingBin: no twistRadS, and the same amplitudes bit for bit", () => {
    const s = steady(cases[0]!);
    const args = {
      timeS: s.timeS,
      angleRad: integrateAngle(s.timeS, s.crank),
      crankRadS: s.crank,
      gearboxRadS: s.gear,
      grid: chooseAngleGrid({ sampleRateHz: 2000, maxRadS: s.w * 1.05, topOrder: 8 }),
      revsPerBlock: 8,
      overlap: 0.5,
      topBin: 66,
    };
    const plain = trackBlocks(args);
    const withTwist = trackBlocks({ ...args, firingBin: 16 });
    expect(plain.twistRadS).toBeUndefined();
    expect(twistCurve(plain, 2, 50)).toEqual([]);
    expect(withTwist.twistRadS?.length).toBe(plain.blockCount);
    expect(Array.from(withTwist.crankAmp)).toEqual(Array.from(plain.crankAmp));
    expect(Array.from(withTwist.gearboxAmp)).toEqual(Array.from(plain.gearboxAmp));
    expect(() => trackBlocks({ ...args, firingBin: 67 })).toThrow(RangeError);
  });
});

describe("relative angle of a start (drift removal)", () => {
  /**
   * Standstill, a start 0 → 800 rpm from 1 s to 2.5 s, idle to 6 s. The damper swings at 7 Hz
   * through the start (Gaussian burst, 1.5° amplitude, centre 2 s, σ = 0.3 s) and by 0.3° at the
   * firing order 1.5 at idle. The gearbox speed is the crank speed minus dθ_rel/dt (analytic).
   */
  function start(fs: number, gearboxScale: number) {
    const n = 6 * fs;
    const timeS = new Float64Array(n);
    const crank = new Float64Array(n);
    const gear = new Float64Array(n);
    const thetaRel = new Float64Array(n);
    const idle = 800 * RAD_PER_RPM;
    const A = 1.5 / DEG;
    const B = 0.3 / DEG;
    const wr = 2 * Math.PI * 7;
    let angle = 0;
    for (let i = 0; i < n; i++) {
      const t = i / fs;
      timeS[i] = t;
      const u = Math.min(1, Math.max(0, (t - 1) / 1.5));
      const w = idle * u * u * (3 - 2 * u); // smooth step
      if (i > 0) angle += (0.5 * (w + crank[i - 1]!)) / fs;
      const e = Math.exp(-0.5 * ((t - 2) / 0.3) ** 2);
      const de = (-(t - 2) / 0.09) * e;
      const wf = 1.5 * idle;
      // θ_rel = A·e(t)·sin(ωr t) + B·u²·sin(1.5·idle·t); dθ_rel/dt analytic (product rule).
      thetaRel[i] = A * e * Math.sin(wr * t) + B * u * u * Math.sin(wf * t);
      const du2 = t > 1 && t < 2.5 ? (2 * u) / 1.5 : 0;
      const dRel =
        A * (de * Math.sin(wr * t) + e * wr * Math.cos(wr * t)) +
        B * (du2 * Math.sin(wf * t) + u * u * wf * Math.cos(wf * t));
      crank[i] = w;
      gear[i] = (w - dRel) * gearboxScale;
    }
    return { timeS, crank, gear, thetaRel, fs, n };
  }

  /** Peak-to-peak over the event (1 s … 3.5 s), degrees. */
  const eventPp = (s: ReturnType<typeof start>, driftCutoffHz?: number) =>
    peakToPeak(
      relativeTwistDeg({
        timeS: s.timeS,
        crankRadS: s.crank,
        gearboxRadS: s.gear,
        sampleRateHz: s.fs,
        driftCutoffHz,
      }),
      s.fs,
      3.5 * s.fs,
    );

  it("without mismatch: the peak-to-peak twist is the analytic θ_rel's within 2 % (drift filter at 0.5 Hz, swing at 7 Hz)", () => {
    const s = start(2000, 1);
    const truth = peakToPeak(s.thetaRel, s.fs, 3.5 * s.fs) * DEG;
    expect(truth).toBeGreaterThan(2.5);
    expect(Math.abs(eventPp(s) / truth - 1)).toBeLessThan(0.02);
  });

  it("a 0.05 % speed-scale mismatch (gearbox × 1.0005) changes the event's peak-to-peak by under 5 %", () => {
    const ref = eventPp(start(2000, 1));
    const off = eventPp(start(2000, 1.0005));
    expect(Math.abs(off / ref - 1)).toBeLessThan(0.05);
  });

  it("the drift removal is what makes it so: the raw integral moves it by more than 5 %", () => {
    const raw = (x: ReturnType<typeof start>) => {
      const th = new Float64Array(x.n);
      for (let i = 1; i < x.n; i++)
        th[i] =
          th[i - 1]! + (0.5 * (x.crank[i]! - x.gear[i]! + x.crank[i - 1]! - x.gear[i - 1]!)) / x.fs;
      return peakToPeak(th, x.fs, 3.5 * x.fs) * DEG;
    };
    // Drift 0.0005·∫ω dt ≈ 4° over the event against a swing of 3° peak to peak.
    expect(Math.abs(raw(start(2000, 1.0005)) / raw(start(2000, 1)) - 1)).toBeGreaterThan(0.05);
  });

  it("no static part: the relative angle at idle averages to 0 whatever the spring's wind-up under load (speed sensors cannot see it)", () => {
    // A constant offset of θ_rel has no speed difference at all: the two speed logs are identical.
    const s = start(2000, 1);
    const rel = relativeTwistDeg({
      timeS: s.timeS,
      crankRadS: s.crank,
      gearboxRadS: s.gear,
      sampleRateHz: s.fs,
    });
    let mean = 0;
    for (let i = 4 * s.fs; i < 5 * s.fs; i++) mean += rel[i]!;
    expect(Math.abs(mean / s.fs)).toBeLessThan(0.05);
  });
});
