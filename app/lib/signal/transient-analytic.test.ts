/**
 * Transients end to end on analytic drive logs built in the test (synthLog): the crank carries a
 * firing-order fluctuation of fixed amplitude, the gearbox the same fluctuation through the
 * quasi-static base-excited transmissibility H(r) = (1 + j2ζr)/(1 − r² + j2ζr) at the
 * instantaneous firing frequency (Harris' Shock and Vibration Handbook ch. 30; Ogata, System
 * Dynamics, eq. 9-14). Expected values come from that formula and from the speed profile.
 */
import { describe, expect, it } from "vitest";
import { analyseDriveLog } from "./analyse.ts";
import { synthLog } from "../../../tests/support/synth-log.ts";
import { analysisResultSchema, type AnalysisResult } from "./result-schema.ts";
import { transferH } from "../../../tests/support/analytic-log.ts";
import type { DriveLog } from "./types.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;
const Q = 1.5; // three-cylinder four-stroke (Rahnejat et al. 2014)
const ZETA = 0.15;
const R_N_RPM = 445; // r = 1 (ωn = √(k/J2)) at 445 rpm
const FN_HZ = (R_N_RPM / 60) * Q;
const AMP_RPM = 10;
const FS = 2000;

/**
 * Speed of the transmissibility's peak: d(T²)/d(r²) = 0 for T² = (1 + a·r²)/((1 − r²)² + a·r²),
 * a = 4ζ², gives a·x² + 2x − 2 = 0, x = r² = (√(1 + 8ζ²) − 1)/(4ζ²) (from the formula in
 * Harris ch. 30; the peak lies below r = 1 for ζ > 0).
 */
const rPeak = Math.sqrt((Math.sqrt(1 + 8 * ZETA ** 2) - 1) / (4 * ZETA ** 2));
const PEAK_RPM = rPeak * R_N_RPM;
const formulaDb = (rpm: number) =>
  -20 * Math.log10(transferH(((rpm / 60) * Q) / FN_HZ, ZETA).magnitude);

/** Idle 800 rpm, then 800 → 200 rpm in 3 s (from 6 s), 200 → 0 in 0.5 s, standstill to 12 s. */
const stopRpm = (t: number) =>
  t < 6 ? 800 : t < 9 ? 800 - 200 * (t - 6) : t < 9.5 ? 200 - 400 * (t - 9) : 0;
/** Standstill to 1 s, cranking at 250 rpm to 2 s, 250 → 900 rpm in 2.6 s (250 rpm/s), 900 → 800 by 5.6 s, idle to 12 s. */
const startRpm = (t: number) =>
  t < 0.8
    ? 0
    : t < 1
      ? 1250 * (t - 0.8)
      : t < 2
        ? 250
        : t < 4.6
          ? 250 + 250 * (t - 2)
          : t < 5.6
            ? 900 - 100 * (t - 4.6)
            : 800;

function log(
  rpmAt: (t: number) => number,
  durationS: number,
  extra: { gearboxScale?: number } = {},
) {
  return synthLog({
    fs: FS,
    durationS,
    rpmAt,
    order: Q,
    ampRpm: AMP_RPM,
    fnHz: FN_HZ,
    zeta: ZETA,
    noiseRpm: 0.2,
    ...extra,
  });
}

function run(l: DriveLog, options = {}): AnalysisResult {
  const out = analyseDriveLog(l, { cylinders: 3, ...options });
  if (!out.ok) throw new Error(`${out.error.code}: ${out.error.message}`);
  return out.value;
}

/** Time (s) the profile spends within ±10 % of `rpm`, on a 0.1 ms grid over [a, b]. */
function timeNear(rpmAt: (t: number) => number, rpm: number, a: number, b: number) {
  let n = 0;
  for (let t = a; t < b; t += 1e-4) if (Math.abs(rpmAt(t) - rpm) <= 0.1 * rpm) n++;
  return n * 1e-4;
}

/**
 * Largest |dω_g/dt| over [a, b] of the analytic gearbox speed ω_g = ω + A·T(r)·cos(qθ + φ(r))
 * (the synthLog formula without noise), differentiated term by term: ω' from the profile, T and φ
 * by a central difference in time of their closed forms, θ' = ω.
 */
function analyticPeakAccel(rpmAt: (t: number) => number, a: number, b: number) {
  const A = AMP_RPM * RAD_PER_RPM;
  const h = 1e-6;
  const rOf = (t: number) => ((rpmAt(t) / 60) * Q) / FN_HZ;
  let theta = 0;
  let peak = 0;
  for (let i = 1; i / FS < b; i++) {
    const t = i / FS;
    theta += (0.5 * (rpmAt(t - 1 / FS) + rpmAt(t)) * RAD_PER_RPM) / FS;
    if (t < a) continue;
    const w = rpmAt(t) * RAD_PER_RPM;
    const dw = ((rpmAt(t + h) - rpmAt(t - h)) * RAD_PER_RPM) / (2 * h);
    const H = transferH(rOf(t), ZETA);
    const Hp = transferH(rOf(t + h), ZETA);
    const Hm = transferH(rOf(t - h), ZETA);
    const dT = (Hp.magnitude - Hm.magnitude) / (2 * h);
    const dPhi = (Hp.phaseRad - Hm.phaseRad) / (2 * h);
    const psi = Q * theta + H.phaseRad;
    const acc = dw + A * (dT * Math.cos(psi) - H.magnitude * Math.sin(psi) * (Q * w + dPhi));
    peak = Math.max(peak, Math.abs(acc));
  }
  return peak;
}

describe("engine stop 800 → 200 rpm in 3 s through a damper resonance at 445 rpm (q = 1.5)", () => {
  const v = run(log(stopRpm, 12));

  it("passes the result schema with transient, events and twist", () => {
    expect(analysisResultSchema.safeParse(JSON.parse(JSON.stringify(v))).success).toBe(true);
    expect(v.transient?.spans.map((s) => s.kind)).toContain("stop");
  });

  it(`resonance within 5 % of the formula's peak r = ${rPeak.toFixed(4)} (${PEAK_RPM.toFixed(1)} rpm; Harris ch. 30)`, () => {
    expect(v.resonance).not.toBeNull();
    expect(Math.abs(v.resonance!.rpm / PEAK_RPM - 1)).toBeLessThan(0.05);
    const ev = v.events!.find((e) => e.kind === "stop")!;
    expect(Math.abs(ev.resonanceRpm! / PEAK_RPM - 1)).toBeLessThan(0.05);
    // Peak amplification: 20·log10 T(r_peak) (Harris ch. 30), within 1 dB.
    expect(Math.abs(ev.peakAmplificationDb! + formulaDb(PEAK_RPM))).toBeLessThan(1);
  });

  it("isolation within 1 dB of −20·log10 T(r) from 0.7× to 1.5× the resonance speed (Harris ch. 30 / Ogata eq. 9-14)", () => {
    const checked = v.isolation.filter((p) => p.rpm >= 0.7 * PEAK_RPM && p.rpm <= 1.5 * PEAK_RPM);
    expect(checked.length).toBeGreaterThanOrEqual(6);
    for (const p of checked) {
      expect(p.aboveNoise).toBe(true);
      expect(p.method).toBe("filter");
      expect(Math.abs(p.dB - formulaDb(p.rpm))).toBeLessThan(1);
    }
  });

  it("the isolation curve reaches below 0.75× the resonance speed", () => {
    const low = v.isolation.filter((p) => p.aboveNoise && p.rpm < 0.75 * PEAK_RPM);
    expect(low.length).toBeGreaterThan(0);
    expect(v.transient!.lowestResolvedRpm!).toBeLessThan(0.75 * PEAK_RPM);
    expect(v.transient!.unresolvedReason).toMatch(/below \d+ rpm/);
  });

  it("the stop event: its span, time near resonance (the profile's, ±0.02 s) and peak gearbox acceleration (the analytic derivative, ±5 %)", () => {
    const stops = v.events!.filter((e) => e.kind === "stop");
    expect(stops).toHaveLength(1);
    const ev = stops[0]!;
    // The slew is read over one block of 8 revolutions (0.6 s at 800 rpm): the start is known to
    // half of it; the end is where the frame speed falls below 20 rpm (9.475 s in the profile).
    expect(Math.abs(ev.startS - 6)).toBeLessThan(0.3);
    expect(Math.abs(ev.endS - 9.475)).toBeLessThan(0.06);
    const expected = timeNear(stopRpm, ev.resonanceRpm!, ev.startS, ev.endS);
    expect(Math.abs(ev.timeNearResonanceS! - expected)).toBeLessThan(0.02);
    const alpha = analyticPeakAccel(stopRpm, ev.startS, ev.endS);
    expect(Math.abs(ev.peakGearboxAngAccelRadS2 / alpha - 1)).toBeLessThan(0.05);
  });

  it("twist: peak-to-peak ≈ 2·max A·|1 − H|/(qω) (angle amplitude = speed amplitude / ω), within 10 %", () => {
    const ev = v.events!.find((e) => e.kind === "stop")!;
    let amp = 0;
    for (let t = ev.startS; t < ev.endS; t += 1e-3) {
      const w = stopRpm(t) * RAD_PER_RPM;
      if (w <= 0) continue;
      const H = transferH(((stopRpm(t) / 60) * Q) / FN_HZ, ZETA);
      const d = Math.hypot(
        1 - H.magnitude * Math.cos(H.phaseRad),
        H.magnitude * Math.sin(H.phaseRad),
      );
      amp = Math.max(amp, (AMP_RPM * RAD_PER_RPM * d) / (Q * w));
    }
    const expectedDeg = 2 * amp * (180 / Math.PI);
    expect(Math.abs(ev.twistPeakToPeakDeg / expectedDeg - 1)).toBeLessThan(0.1);
  });

  it("a 0.05 % speed-scale mismatch between the sensors changes the event's peak-to-peak twist by at most 5 %", () => {
    const w = run(log(stopRpm, 12, { gearboxScale: 1.0005 }));
    const a = v.events!.find((e) => e.kind === "stop")!.twistPeakToPeakDeg;
    const b = w.events!.find((e) => e.kind === "stop")!.twistPeakToPeakDeg;
    expect(Math.abs(b / a - 1)).toBeLessThanOrEqual(0.05);
  });
});

describe("the same engine stop with a lighter damping, ζ = 0.1 (a sharper resonance crossed as fast)", () => {
  const zeta = 0.1;
  const v = run(
    synthLog({
      fs: FS,
      durationS: 12,
      rpmAt: stopRpm,
      order: Q,
      ampRpm: AMP_RPM,
      fnHz: FN_HZ,
      zeta,
      noiseRpm: 0.2,
    }),
  );
  // Peak of T(r) as above (Harris ch. 30): r² = (√(1 + 8ζ²) − 1)/(4ζ²).
  const peakRpm = Math.sqrt((Math.sqrt(1 + 8 * zeta ** 2) - 1) / (4 * zeta ** 2)) * R_N_RPM;
  const db = (rpm: number) => -20 * Math.log10(transferH(((rpm / 60) * Q) / FN_HZ, zeta).magnitude);

  it("resonance within 5 % of the formula's peak; isolation within 1 dB from 0.7× to 1.5× of it (Harris ch. 30 / Ogata eq. 9-14)", () => {
    const ev = v.events!.find((e) => e.kind === "stop")!;
    expect(Math.abs(ev.resonanceRpm! / peakRpm - 1)).toBeLessThan(0.05);
    expect(Math.abs(ev.peakAmplificationDb! + db(peakRpm))).toBeLessThan(1);
    const checked = v.isolation.filter((p) => p.rpm >= 0.7 * peakRpm && p.rpm <= 1.5 * peakRpm);
    expect(checked.length).toBeGreaterThanOrEqual(6);
    for (const p of checked) expect(Math.abs(p.dB - db(p.rpm))).toBeLessThan(1);
  });
});

it("transients: false gives the blocks-only result (no transient, events or twist; every bin from the blocks)", () => {
  const v = run(log(stopRpm, 12), { transients: false });
  expect(v.transient).toBeUndefined();
  expect(v.events).toBeUndefined();
  expect(v.twist).toBeUndefined();
  expect(v.isolation.every((p) => p.method === "blocks")).toBe(true);
  const bad = analyseDriveLog(log(stopRpm, 12), { transients: "yes" as never });
  expect(!bad.ok && bad.error.code).toBe("invalid_option");
});

it("a log split into sections: the stop is found in its own section, times in the log's terms", () => {
  const l = log(stopRpm, 12);
  // Two sections with the cut in the idle (ingest-repairs.ts splits at a gap too long to repair).
  const cut = 3 * FS;
  l.sections = [
    { startIndex: 0, endIndex: cut, startS: 0, endS: l.timeS[cut - 1]! },
    {
      startIndex: cut,
      endIndex: l.timeS.length,
      startS: l.timeS[cut]!,
      endS: l.timeS[l.timeS.length - 1]!,
    },
  ];
  const v = run(l);
  const stops = v.events!.filter((e) => e.kind === "stop");
  expect(stops).toHaveLength(1);
  expect(Math.abs(stops[0]!.startS - 6)).toBeLessThan(0.3);
  expect(Math.abs(stops[0]!.resonanceRpm! / PEAK_RPM - 1)).toBeLessThan(0.05);
});

describe("engine start: cranking at 250 rpm, 250 → 900 rpm in 2.6 s, settling at 800 rpm", () => {
  const v = run(log(startRpm, 12));

  it("resonance within 5 % of the formula's peak (Harris ch. 30), and the start event: time near resonance (the profile's, ±0.02 s), peak gearbox acceleration (the analytic derivative, ±5 %)", () => {
    expect(v.resonance).not.toBeNull();
    expect(Math.abs(v.resonance!.rpm / PEAK_RPM - 1)).toBeLessThan(0.05);
    const starts = v.events!.filter((e) => e.kind === "start");
    expect(starts).toHaveLength(1);
    const ev = starts[0]!;
    expect(Math.abs(ev.resonanceRpm! / PEAK_RPM - 1)).toBeLessThan(0.05);
    expect(ev.startS).toBeLessThan(2.3);
    expect(ev.endS).toBeGreaterThan(4);
    const expected = timeNear(startRpm, ev.resonanceRpm!, ev.startS, ev.endS);
    expect(Math.abs(ev.timeNearResonanceS! - expected)).toBeLessThan(0.02);
    const alpha = analyticPeakAccel(startRpm, ev.startS, ev.endS);
    expect(Math.abs(ev.peakGearboxAngAccelRadS2 / alpha - 1)).toBeLessThan(0.05);
  });

  it("isolation within 1 dB of the formula from 0.7× to 1.5× the resonance speed, reaching below 0.75× (Harris ch. 30)", () => {
    const checked = v.isolation.filter((p) => p.rpm >= 0.7 * PEAK_RPM && p.rpm <= 1.5 * PEAK_RPM);
    expect(checked.length).toBeGreaterThanOrEqual(6);
    for (const p of checked) {
      expect(p.aboveNoise).toBe(true);
      expect(Math.abs(p.dB - formulaDb(p.rpm))).toBeLessThan(1);
    }
    expect(v.transient!.lowestResolvedRpm!).toBeLessThan(0.75 * PEAK_RPM);
  });
});

describe("fast run-up 1000 → 6000 rpm in 5 s against a slow one (50 rpm/s) of the same system", () => {
  // Four-cylinder four-stroke (q = 2), fn = 15 Hz, ζ = 0.15: r from 2.2 to 13.3.
  const fnHz = 15;
  const zeta = 0.15;
  const ramp = (from: number, to: number, t0: number, dur: number) => (t: number) =>
    t < t0 ? from : t < t0 + dur ? from + ((to - from) * (t - t0)) / dur : to;
  const make = (durationS: number, rampS: number) =>
    synthLog({
      fs: 4000,
      durationS,
      rpmAt: ramp(1000, 6000, 3, rampS),
      order: 2,
      ampRpm: AMP_RPM,
      fnHz,
      zeta,
      noiseRpm: 0.2,
    });
  const expected = (rpm: number) =>
    -20 * Math.log10(transferH(((rpm / 60) * 2) / fnHz, zeta).magnitude);
  /** Mean and largest |measured − formula| over the bins above the noise, 1000–6000 rpm. */
  const errors = (v: AnalysisResult) => {
    const pts = v.isolation.filter((p) => p.aboveNoise && p.rpm >= 1000 && p.rpm <= 6000);
    const e = pts.map((p) => Math.abs(p.dB - expected(p.rpm)));
    return { bins: pts.length, mean: e.reduce((s, x) => s + x, 0) / e.length, max: Math.max(...e) };
  };
  const fast = analyseDriveLog(make(10, 5));
  const slow = analyseDriveLog(make(105, 100));

  it("the fast one is measured by the filter between 1000 rpm and the speed where 1000 rpm/s falls under the slew limit (0.05·n²/(60·8): 3098 rpm)", () => {
    if (!fast.ok) throw new Error(fast.error.message);
    const spans = fast.value.transient!.spans;
    expect(spans.length).toBeGreaterThanOrEqual(1);
    expect(spans[0]!.kind).toBe("fast");
    const filterBins = fast.value.isolation.filter((p) => p.method === "filter");
    expect(Math.min(...filterBins.map((p) => p.rpm))).toBeLessThanOrEqual(1100);
    expect(Math.max(...filterBins.map((p) => p.rpm))).toBeGreaterThan(2500);
    expect(fast.value.events).toEqual([]);
    if (!slow.ok) throw new Error(slow.error.message);
    expect(slow.value.transient!.spans).toHaveLength(0);
  });

  it("both within 0.3 dB mean and 1.0 dB max of −20·log10 T(r) where the gearbox is above the noise (Harris ch. 30 / Ogata eq. 9-14)", () => {
    if (!fast.ok || !slow.ok) throw new Error("analysis failed");
    for (const v of [fast.value, slow.value]) {
      const e = errors(v);
      expect(e.bins).toBeGreaterThan(60);
      expect(e.mean).toBeLessThan(0.3);
      expect(e.max).toBeLessThan(1.0);
    }
  });
});
