/**
 * Adaptive blocks on an analytic fast run-up, 1000 → 6000 rpm in 5 s (1000 rpm/s): the crank
 * carries 10 rpm of the firing order, the gearbox the same shaped by the base-excited two-mass
 * transfer function H(r) = (1 + j2ζr)/(1 − r² + j2ζr) (Harris' Shock and Vibration Handbook
 * ch. 30; Ogata eq. 9-14) at the instantaneous firing frequency, as synthLog in analyse.test.ts
 * builds it (written out here: importing a test file would run its tests again).
 */
import { describe, expect, it } from "vitest";
import { adaptiveBlocks, adaptiveRevs } from "./adaptive-blocks.ts";
import { chooseAngleGrid, integrateAngle } from "./angle-grid.ts";
import { transferFunction } from "./two-mass-model.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;
const FN_HZ = 15;
const ZETA = 0.1;
const AMP_RPM = 10;

function runUp(fs: number, q: number) {
  const durationS = 5;
  const n = Math.round(fs * durationS);
  const rpmAt = (t: number) => 1000 + 1000 * t;
  const timeS = new Float64Array(n);
  const crank = new Float64Array(n);
  const gear = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    timeS[i] = t;
    const w = rpmAt(t) * RAD_PER_RPM;
    const theta = 1000 * RAD_PER_RPM * t + 0.5 * 1000 * RAD_PER_RPM * t * t;
    const h = transferFunction((q * rpmAt(t)) / 60 / FN_HZ, ZETA);
    const a = AMP_RPM * RAD_PER_RPM;
    crank[i] = w + a * Math.cos(q * theta);
    gear[i] = w + a * h.magnitude * Math.cos(q * theta + h.phaseRad);
  }
  return { timeS, crank, gear, fs, n };
}

function blocksOf(q: number, maxSpeedChange = 0.05) {
  const s = runUp(5000, q);
  const grid = chooseAngleGrid({
    sampleRateHz: s.fs,
    maxRadS: 6100 * RAD_PER_RPM,
    topOrder: 4 * q,
  });
  return adaptiveBlocks({
    timeS: s.timeS,
    angleRad: integrateAngle(s.timeS, s.crank),
    crankRadS: s.crank,
    gearboxRadS: s.gear,
    grid,
    order: q,
    spans: [{ startIndex: 0, endIndex: s.n }],
    maxRevs: 8,
    maxSpeedChange,
  });
}

describe("revolutions per block", () => {
  it("put the firing order on a bin: q·R whole, q·R ≥ 3, powers of two up to maxRevs", () => {
    expect(adaptiveRevs(2, 8)).toEqual([2, 4, 8]);
    expect(adaptiveRevs(1.5, 8)).toEqual([2, 4, 8]);
    expect(adaptiveRevs(1, 8)).toEqual([4, 8]);
    expect(adaptiveRevs(1.25, 8)).toEqual([4, 8]);
    expect(adaptiveRevs(0.5, 4)).toEqual([8]);
  });
});

for (const q of [2, 1.5]) {
  describe(`fast run-up, firing order ${q} (1000 → 6000 rpm in 5 s)`, () => {
    const blocks = blocksOf(q);
    const shortest = adaptiveRevs(q, 8)[0]!;

    it("covers the run-up with blocks whose order resolution is 1/revs and q·revs whole", () => {
      expect(blocks.length).toBeGreaterThan(50);
      for (const b of blocks) {
        expect(b.orderResolution).toBe(1 / b.revs);
        expect(Number.isInteger(q * b.revs)).toBe(true);
      }
      // Fewer revolutions at low speed: the first blocks are the shortest, the fast ones the
      // longest (near the span's end only shorter blocks still fit).
      expect(blocks[0]!.revs).toBe(shortest);
      const fast = blocks.filter((b) => b.startS > 3 && b.startS < 4.5);
      expect(fast.length).toBeGreaterThan(5);
      expect(fast.every((b) => b.revs === 8)).toBe(true);
    });

    it("the speed change inside each block stays within 5 % unless the block is already the shortest (analytic ramp 1000 rpm/s)", () => {
      let longerChecked = 0;
      for (const b of blocks) {
        // Analytic: the speed rises 1000 rpm/s, so across the block by 1000·(endS − startS).
        const change = (1000 * (b.endS - b.startS)) / b.rpm;
        if (b.revs > shortest) {
          longerChecked++;
          expect(change).toBeLessThan(0.05 * 1.02);
        }
        // The rule's own measure agrees with the analytic one (firing-period averages at both
        // ends; at the log's first sample that average is one-sided, so the first block is left out).
        if (b.startS > 0.1) expect(Math.abs(b.speedChange! - change)).toBeLessThan(0.002);
      }
      expect(longerChecked).toBeGreaterThan(10);
    });

    it("crank firing-order amplitude within 1 % of 10 rpm, gearbox within 2 % of 10·|H(r)| (Harris ch. 30)", () => {
      for (const b of blocks) {
        const h = transferFunction((q * b.rpm) / 60 / FN_HZ, ZETA).magnitude;
        expect(Math.abs(b.crankRadS / (AMP_RPM * RAD_PER_RPM) - 1)).toBeLessThan(0.01);
        expect(Math.abs(b.gearboxRadS / (AMP_RPM * RAD_PER_RPM * h) - 1)).toBeLessThan(0.02);
      }
    });

    it("|C − G| per block is the analytic |1 − H(r)|·10 rpm within 2 %", () => {
      for (const b of blocks) {
        const h = transferFunction((q * b.rpm) / 60 / FN_HZ, ZETA);
        const d = Math.hypot(
          1 - h.magnitude * Math.cos(h.phaseRad),
          h.magnitude * Math.sin(h.phaseRad),
        );
        expect(Math.abs(b.twistRadS! / (AMP_RPM * RAD_PER_RPM * d) - 1)).toBeLessThan(0.02);
      }
    });
  });
}

describe("spans and limits", () => {
  it("stays inside the spans it is given", () => {
    const s = runUp(5000, 2);
    const grid = chooseAngleGrid({ sampleRateHz: s.fs, maxRadS: 6100 * RAD_PER_RPM, topOrder: 8 });
    const blocks = adaptiveBlocks({
      timeS: s.timeS,
      angleRad: integrateAngle(s.timeS, s.crank),
      crankRadS: s.crank,
      gearboxRadS: s.gear,
      grid,
      order: 2,
      spans: [
        { startIndex: 5000, endIndex: 10000 },
        { startIndex: 20000, endIndex: 21000 },
      ],
      maxRevs: 8,
    });
    expect(blocks.length).toBeGreaterThan(5);
    for (const b of blocks) {
      const inFirst = b.startS >= 1 - 1e-9 && b.endS <= 2 + 1e-3;
      const inSecond = b.startS >= 4 - 1e-9 && b.endS <= 4.2 + 1e-3;
      expect(inFirst || inSecond).toBe(true);
    }
  });

  it("a looser limit gives longer blocks", () => {
    const tight = blocksOf(2, 0.05);
    const loose = blocksOf(2, 0.5);
    expect(loose.length).toBeLessThan(tight.length);
    expect(loose.filter((b) => b.endS < 4.9).every((b) => b.revs === 8)).toBe(true);
  });
});
