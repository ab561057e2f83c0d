/**
 * The slew rule and span kinds of transient.ts on analytic speed profiles, the filter's stated
 * selectivity, and the merge of filter and block curves (transient-curves.ts).
 */
import { describe, expect, it } from "vitest";
import { integrateAngle } from "./angle-grid.ts";
import type { TrackedBlocks } from "./order-tracking.ts";
import { filterGainAt } from "./span-measure.ts";
import { findFastSpans, slewLimitRpmS, TRANSIENT_FILTER } from "./transient.ts";
import { blocksOutside, mergeByRpm } from "./transient-curves.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;
const FS = 1000;

function profile(rpmAt: (t: number) => number, durationS: number) {
  const n = Math.round(durationS * FS);
  const timeS = Float64Array.from({ length: n }, (_, i) => i / FS);
  const crank = timeS.map((t) => rpmAt(t) * RAD_PER_RPM);
  return { timeS, angleRad: integrateAngle(timeS, crank) };
}

const ramp = (from: number, to: number, t0: number, rate: number) => (t: number) => {
  const end = t0 + Math.abs(to - from) / rate;
  return t < t0 ? from : t < end ? from + Math.sign(to - from) * rate * (t - t0) : to;
};

describe("slew rule: at most 5 % speed change within one block of R revolutions", () => {
  it("the limit is 0.05·n/T_block with T_block = 60·R/n s (R = 8: 66.7 rpm/s at 800 rpm, 416.7 at 2000)", () => {
    // A block of R revolutions at n rpm lasts 60·R/n s; 5 % of n in that time.
    for (const [rpm, R] of [
      [800, 8],
      [2000, 8],
      [3000, 16],
    ] as const) {
      const blockS = (60 * R) / rpm;
      expect(slewLimitRpmS(rpm, R)).toBeCloseTo((0.05 * rpm) / blockS, 9);
    }
    expect(slewLimitRpmS(800, 8)).toBeCloseTo(66.67, 2);
  });

  it("a ramp 1800 → 2200 rpm at 1.3× the limit at 2200 rpm is one fast span; at 0.7× the limit at 1800 rpm none", () => {
    const fastRate = 1.3 * slewLimitRpmS(2200, 8);
    const fast = profile(ramp(1800, 2200, 3, fastRate), 6);
    const spans = findFastSpans({ ...fast, revsPerBlock: 8, idleRpm: 800 });
    expect(spans).toHaveLength(1);
    expect(spans[0]!.kind).toBe("fast");
    // The slew is read over one block centred on each instant: the span's ends are known to half
    // a block (4 revolutions: 0.13 s at 1800 rpm) plus one 0.05 s frame.
    const endS = 3 + 400 / fastRate;
    expect(Math.abs(spans[0]!.startS - 3)).toBeLessThan(0.2);
    expect(Math.abs(spans[0]!.endS - endS)).toBeLessThan(0.2);
    const slow = profile(ramp(1800, 2200, 3, 0.7 * slewLimitRpmS(1800, 8)), 8);
    expect(findFastSpans({ ...slow, revsPerBlock: 8, idleRpm: 800 })).toHaveLength(0);
  });

  it("a steady log with a firing-order ripple of ±5 % has no fast span (the slew is read over whole revolutions)", () => {
    const n = 10 * FS;
    const timeS = Float64Array.from({ length: n }, (_, i) => i / FS);
    const crank = new Float64Array(n);
    let theta = 0;
    for (let i = 0; i < n; i++) {
      crank[i] = 800 * RAD_PER_RPM * (1 + 0.05 * Math.cos(2 * theta));
      theta += crank[i]! / FS;
    }
    const spans = findFastSpans({
      timeS,
      angleRad: integrateAngle(timeS, crank),
      revsPerBlock: 8,
      idleRpm: 800,
    });
    expect(spans).toHaveLength(0);
  });

  it("kinds: 800 → 0 rpm in 2 s is a stop, 0 → 250 → 800 rpm a start, 800 → 600 → 800 rpm in 1 s fast", () => {
    const stop = profile(ramp(800, 0, 4, 400), 8);
    expect(findFastSpans({ ...stop, revsPerBlock: 8, idleRpm: 800 }).map((s) => s.kind)).toEqual([
      "stop",
    ]);
    const start = profile(
      (t) => (t < 1 ? 0 : t < 1.2 ? 1250 * (t - 1) : t < 2 ? 250 : ramp(250, 800, 2, 500)(t)),
      8,
    );
    expect(findFastSpans({ ...start, revsPerBlock: 8, idleRpm: 800 }).map((s) => s.kind)).toEqual([
      "start",
    ]);
    const dip = profile(
      (t) => (t < 3.5 ? ramp(800, 600, 3, 400)(t) : ramp(600, 800, 3.5, 400)(t)),
      8,
    );
    expect(findFastSpans({ ...dip, revsPerBlock: 8, idleRpm: 800 }).map((s) => s.kind)).toEqual([
      "fast",
    ]);
  });
});

describe("the order filter's selectivity", () => {
  it("passes the order line at half power at ±bandwidth and rejects q ± 0.5 orders as Tůma 2005, eq. 8 says", () => {
    // |H(Δf)| = 1/(1 + r²·(2 − 2cos(2πΔf/fs))^p) with r² set for |H| = 1/√2 at Δf₃ (Tůma 2005).
    expect(filterGainAt(TRANSIENT_FILTER.bandwidthOrders, 1000, 5000)).toBeCloseTo(Math.SQRT1_2, 6);
    // Small-offset form: 1/(1 + (√2 − 1)·(Δf/Δf₃)^(2p)); with 0.25 orders and p = 3 at 0.5 orders
    // 1/(1 + 0.4142·2⁶) = 0.0363 (−28.8 dB).
    const g = filterGainAt(0.5, 1000, 5000);
    const ratio = 0.5 / TRANSIENT_FILTER.bandwidthOrders;
    const expected = 1 / (1 + (Math.SQRT2 - 1) * ratio ** (2 * TRANSIENT_FILTER.poles));
    expect(Math.abs(g / expected - 1)).toBeLessThan(0.01);
    expect(g).toBeLessThan(0.1); // at least 20 dB down
  });
});

describe("merging filter and block curves", () => {
  it("a bin with blocks keeps the blocks; the filter fills the others", () => {
    const blocks = [
      { rpm: 800, v: "b" },
      { rpm: 900, v: "b" },
    ];
    const filter = [
      { rpm: 700, v: "f" },
      { rpm: 800, v: "f" },
    ];
    expect(mergeByRpm(blocks, filter)).toEqual([
      { rpm: 700, v: "f" },
      { rpm: 800, v: "b" },
      { rpm: 900, v: "b" },
    ]);
  });

  it("blocks that overlap a span are left out, with all their bins", () => {
    const tracked: TrackedBlocks = {
      revsPerBlock: 8,
      orderStep: 0.125,
      binsPerBlock: 2,
      blockCount: 3,
      blockRadS: Float64Array.of(1, 2, 3),
      blockStartS: Float64Array.of(0, 1, 2),
      blockEndS: Float64Array.of(1.5, 2.5, 3.5),
      crankAmp: Float64Array.of(10, 11, 20, 21, 30, 31),
      gearboxAmp: Float64Array.of(1, 2, 3, 4, 5, 6),
      droppedSlowBlocks: 0,
      samplesPerRevRange: [64, 64],
    };
    const kept = blocksOutside(tracked, [{ startS: 1.6, endS: 1.9 }]);
    expect(kept.blockCount).toBe(2);
    expect(Array.from(kept.blockRadS)).toEqual([1, 3]);
    expect(Array.from(kept.crankAmp)).toEqual([10, 11, 30, 31]);
    expect(Array.from(kept.gearboxAmp)).toEqual([1, 2, 5, 6]);
  });
});
