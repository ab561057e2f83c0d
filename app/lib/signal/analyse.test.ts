/**
 * End to end on analytic drive logs built inside the test (never the demo samples): the crank
 * carries an order-q fluctuation, the gearbox the same fluctuation shaped by the base-excited
 * two-mass transfer function H(r) = (1 + j2ζr)/(1 − r² + j2ζr) (Harris' Shock and Vibration
 * Handbook ch. 30; Ogata eq. 9-14), magnitude and phase, at the instantaneous firing frequency.
 */
import { describe, expect, it } from "vitest";
import { analyseDriveLog } from "./analyse.ts";
import { analysisResultSchema } from "./result-schema.ts";
import { transmissibility } from "./two-mass-model.ts";
import type { DriveLog } from "./types.ts";
import { synthLog } from "../../../tests/support/synth-log.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;

const expectedIsolationDb = (rpm: number, order: number, fnHz: number, zeta: number) =>
  -20 * Math.log10(transmissibility(((rpm / 60) * order) / fnHz, zeta));

function run(log: DriveLog, options = {}) {
  const out = analyseDriveLog(log, options);
  if (!out.ok) throw new Error(`${out.error.code}: ${out.error.message}`);
  return out.value;
}

describe("constant-speed logs", () => {
  for (const rpm of [350, 450, 600, 1000, 2000]) {
    it(`isolation at ${rpm} rpm matches −20·log10 T(r) within 0.3 dB (Harris ch. 30 / Ogata eq. 9-14)`, () => {
      const fnHz = 15;
      const zeta = 0.1;
      const v = run(
        synthLog({
          fs: 2000,
          durationS: 20,
          rpmAt: () => rpm,
          order: 2,
          ampRpm: 10,
          fnHz,
          zeta,
          noiseRpm: 0.2,
        }),
      );
      const p = v.isolation.find((x) => x.rpm === rpm);
      expect(p?.aboveNoise).toBe(true);
      expect(Math.abs(p!.dB - expectedIsolationDb(rpm, 2, fnHz, zeta))).toBeLessThan(0.3);
    });
  }

  it("idle rattle check: 10 rpm of order 2 at 800 rpm → 175.5 rad/s² within 5 % (REFERENCES α = Δω·q·Ω [computed])", () => {
    const v = run(
      synthLog({
        fs: 2000,
        durationS: 30,
        rpmAt: () => 800,
        order: 2,
        ampRpm: 10,
        fnHz: 12,
        zeta: 0.1,
        gearboxFixed: true,
      }),
    );
    expect(v.idle).not.toBeNull();
    expect(Math.abs(v.idle!.gearboxAngAccelRadS2 / 175.5 - 1)).toBeLessThan(0.05);
    // The time-domain peak of a pure sinusoid equals its amplitude (d/dt of A·cos(qΩt) peaks at A·q·Ω).
    expect(Math.abs(v.idle!.gearboxAngAccelPeakRadS2 / 175.5 - 1)).toBeLessThan(0.05);
    expect(v.idle!.verdict).toBe("ok");
    expect(v.idle!.spans).toHaveLength(0);
    const strict = run(
      synthLog({
        fs: 2000,
        durationS: 30,
        rpmAt: () => 800,
        order: 2,
        ampRpm: 10,
        fnHz: 12,
        zeta: 0.1,
        gearboxFixed: true,
      }),
      { rattleLimitRadS2: 150 },
    );
    expect(strict.idle!.verdict).toBe("over-limit");
    expect(strict.idle!.spans.reduce((s, x) => s + x.durationS, 0)).toBeGreaterThan(20);
  });

  it("three-cylinder override: the firing order 1.5 is the one analysed (Rahnejat et al. 2014)", () => {
    const v = run(
      synthLog({
        fs: 2000,
        durationS: 20,
        rpmAt: () => 900,
        order: 1.5,
        ampRpm: 8,
        fnHz: 10,
        zeta: 0.1,
      }),
      { cylinders: 3 },
    );
    expect(v.firingOrder).toBe(1.5);
    const fire = v.orderCurves.find((c) => c.order === 1.5)!;
    expect(Math.abs(fire.points[0]!.crankRpm / 8 - 1)).toBeLessThan(0.01);
  });
});

describe("linear run-up through the damper resonance", () => {
  const fnHz = 15; // r = 1 at 450 rpm for order 2
  const zeta = 0.1;
  const log = synthLog({
    fs: 2000,
    durationS: 60,
    rpmAt: (t) => 300 + (2700 * t) / 60,
    order: 2,
    ampRpm: 10,
    fnHz,
    zeta,
    noiseRpm: 0.2,
  });
  const v = run(log);

  it("isolation matches the formula within 0.3 dB wherever r ≥ 1.6 and the gearbox is above the noise (Harris ch. 30)", () => {
    // Near r = 1 the curve moves by more than 0.3 dB inside one 50 rpm bin, so the bin value
    // depends on where in the bin the blocks fell; there the model fit below is the check.
    const checked = v.isolation.filter((p) => p.aboveNoise && ((p.rpm / 60) * 2) / fnHz >= 1.6);
    expect(checked.length).toBeGreaterThan(30);
    for (const p of checked)
      expect(Math.abs(p.dB - expectedIsolationDb(p.rpm, 2, fnHz, zeta))).toBeLessThan(0.3);
  });

  it("the two-mass fit returns ωn within 5 % and ζ within 20 % (analytic system)", () => {
    expect(v.model).not.toBeNull();
    expect(Math.abs(v.model!.naturalFrequencyHz / fnHz - 1)).toBeLessThan(0.05);
    expect(Math.abs(v.model!.dampingRatio / zeta - 1)).toBeLessThan(0.2);
  });

  it("the resonance (least isolation) is found within one bin of r = 1, as amplification", () => {
    expect(v.resonance).not.toBeNull();
    expect(Math.abs(v.resonance!.rpm - 450)).toBeLessThanOrEqual(50);
    expect(v.resonance!.isolationDb).toBeLessThan(0);
  });

  it("the crank order-2 curve reads the imposed 10 rpm within 1 % above 700 rpm (analytic signal)", () => {
    const fire = v.orderCurves.find((c) => c.order === 2)!;
    for (const p of fire.points.filter((x) => x.rpm >= 700))
      expect(Math.abs(p.crankRpm / 10 - 1)).toBeLessThan(0.01);
  });

  it("the order map and the order-0.5 curve hold no speed trend: above 700 rpm orders 0.125–0.5 stay below 1 % of the imposed 10 rpm of order 2 on both channels (the log has no content there; analytic signal)", () => {
    // Without the line removed per block, order 0.125 read 3/(4π) of the block's speed rise
    // (order-tracking.test.ts): about 7 rpm at 700 rpm here. Below 700 rpm the speed is not
    // a straight line in crank angle within a block (ω(θ) = √(ω0² + 2αθ) bends most at low ω),
    // and what is left reaches about 2 % at 350 rpm.
    const m = v.orderMap;
    expect(m.orderStep).toBe(0.125);
    let rows = 0;
    for (let r = 0; r < m.crankRpm.length; r++) {
      if (m.blockRpm[r]! < 700) continue;
      rows++;
      for (const k of [1, 2, 3, 4]) {
        expect(m.crankRpm[r]![k]!).toBeLessThan(0.01 * 10);
        expect(m.gearboxRpm[r]![k]!).toBeLessThan(0.01 * 10);
      }
    }
    expect(rows).toBeGreaterThan(100);
    const half = v.orderCurves.find((c) => c.order === 0.5)!;
    for (const p of half.points.filter((x) => x.rpm >= 700)) {
      expect(p.crankRpm).toBeLessThan(0.01 * 10);
      expect(p.gearboxRpm).toBeLessThan(0.01 * 10);
    }
  });

  it("segments: one run-up across the log", () => {
    expect(v.segments.map((s) => s.kind)).toContain("run-up");
    const up = v.segments.find((s) => s.kind === "run-up")!;
    expect(up.endS - up.startS).toBeGreaterThan(50);
  });

  it("passes the result schema after a JSON round trip and holds no NaN or Infinity", () => {
    const json = JSON.stringify(v);
    expect(json).not.toMatch(/NaN|Infinity/);
    expect(analysisResultSchema.safeParse(JSON.parse(json)).success).toBe(true);
    expect(v.settings.revsPerBlock).toBe(8);
    expect(v.orderCurves.map((c) => c.order)).toEqual([0.5, 1, 2, 4]);
    expect(json.length).toBeLessThan(2_000_000);
  });
});

describe("options and bad input come back as error values", () => {
  const ok = synthLog({
    fs: 1000,
    durationS: 5,
    rpmAt: () => 800,
    order: 2,
    ampRpm: 5,
    fnHz: 12,
    zeta: 0.1,
  });
  for (const [name, opts] of [
    ["cylinders 0", { cylinders: 0 }],
    ["stroke 3", { stroke: 3 }],
    ["negative firing order", { firingOrder: -2 }],
    ["overlap 1", { overlap: 1 }],
    ["bin width 0", { binRpm: 0 }],
    ["samples per revolution below twice the top order", { samplesPerRev: 8 }],
    ["rattle limit NaN", { rattleLimitRadS2: NaN }],
  ] as const) {
    it(`refuses ${name}`, () => {
      const out = analyseDriveLog(ok, opts as never);
      expect(out.ok).toBe(false);
      if (!out.ok) expect(out.error.code).toBe("invalid_option");
    });
  }
  it("refuses a log too short for one block, and non-finite samples", () => {
    const short = synthLog({
      fs: 1000,
      durationS: 0.3,
      rpmAt: () => 800,
      order: 2,
      ampRpm: 5,
      fnHz: 12,
      zeta: 0.1,
    });
    const a = analyseDriveLog(short);
    expect(!a.ok && a.error.code).toBe("too_few_revolutions");
    const bad = synthLog({
      fs: 1000,
      durationS: 2,
      rpmAt: () => 800,
      order: 2,
      ampRpm: 5,
      fnHz: 12,
      zeta: 0.1,
    });
    bad.gearboxRadS[500] = NaN;
    const b = analyseDriveLog(bad);
    expect(!b.ok && b.error.code).toBe("non_finite_value");
  });
  // Sampling theorem (Shannon): order q at shaft rate f needs fs > 2·q·f; at or below one sample
  // per crank revolution not even order 0.5 can be read.
  const steady = (fs: number, n: number, rpm: number): DriveLog => {
    const timeS = Float64Array.from({ length: n }, (_, i) => i / fs);
    const speed = new Float64Array(n).fill(rpm * RAD_PER_RPM);
    return {
      timeS,
      crankRadS: speed,
      gearboxRadS: speed.slice(),
      extra: {},
      sampleRateHz: fs,
      source: {} as DriveLog["source"],
    };
  };
  const codeOf = (log: DriveLog) => {
    const out = analyseDriveLog(log);
    return out.ok ? "ok" : out.error.code;
  };
  it("refuses at most one sample per crank revolution, before any block is tracked", () => {
    // 800 rpm is 13.3 rev/s: 13 Hz is below one sample per revolution, 14 Hz just above.
    expect(codeOf(steady(13, 1300, 800))).toBe("sample_rate_too_low");
    expect(codeOf(steady(14, 1400, 800))).not.toBe("sample_rate_too_low");
    // Two rows 10^7 s apart at 800 rpm: 1.3·10^8 revolutions for the blocks to cover (this
    // took minutes and gigabytes before the check).
    expect(codeOf(steady(1e-7, 2, 800))).toBe("sample_rate_too_low");
  });
  it("reports progress through the three stages in order", () => {
    const stages: string[] = [];
    analyseDriveLog(ok, {}, (s) => {
      if (stages[stages.length - 1] !== s) stages.push(s);
    });
    expect(stages).toEqual(["track", "spectra", "results"]);
  });
});
