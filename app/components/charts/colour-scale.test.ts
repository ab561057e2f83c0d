import { describe, expect, it } from "vitest";
import { DB_RANGE, levelScale, mapMaximum, relativeLuminance, viridis } from "./colour-scale";

/**
 * Entries of the published viridis table (BIDS mpl-colormaps, CC0; the same 256 entries as
 * matplotlib's `_viridis_data`), chosen between the ramp's stops so the check covers the
 * interpolation. [index of 255, r, g, b].
 */
const PUBLISHED: [number, number, number, number][] = [
  [0, 0.267004, 0.004874, 0.329415],
  [4, 0.272594, 0.025563, 0.353093],
  [100, 0.166617, 0.463708, 0.558119],
  [128, 0.127568, 0.566949, 0.550556],
  [170, 0.20803, 0.718701, 0.472873],
  [203, 0.468053, 0.818921, 0.323998],
  [244, 0.886271, 0.892374, 0.095374],
  [251, 0.9553, 0.901065, 0.118128],
  [255, 0.993248, 0.906157, 0.143936],
];

describe("viridis ramp", () => {
  it.each(PUBLISHED)("matches the published table at entry %i", (i, r, g, b) => {
    const [vr, vg, vb] = viridis(i / 255);
    // Linear interpolation between every 8th entry: within 0.007 (under 2 steps of 8-bit colour).
    expect(Math.abs(vr - r)).toBeLessThan(0.007);
    expect(Math.abs(vg - g)).toBeLessThan(0.007);
    expect(Math.abs(vb - b)).toBeLessThan(0.007);
  });

  it("ends are the published #440154 and #fde725 (matplotlib documentation)", () => {
    const hex = (t: number) => viridis(t).map((c) => Math.round(c * 255));
    expect(hex(0)).toEqual([0x44, 0x01, 0x54]);
    expect(hex(1)).toEqual([0xfd, 0xe7, 0x25]);
  });

  it("gets lighter all the way (perceptually ordered: relative luminance, WCAG 2.x)", () => {
    let previous = -1;
    for (let k = 0; k <= 500; k++) {
      const l = relativeLuminance(viridis(k / 500));
      expect(l).toBeGreaterThan(previous);
      previous = l;
    }
  });

  it("clamps outside [0, 1] and treats NaN as the bottom", () => {
    expect(viridis(-1)).toEqual(viridis(0));
    expect(viridis(2)).toEqual(viridis(1));
    expect(viridis(Number.NaN)).toEqual(viridis(0));
  });
});

describe("level scale", () => {
  it("linear: 0 to the largest amplitude", () => {
    const s = levelScale("linear", 136);
    expect([s.min, s.max, s.unit]).toEqual([0, 136, "rpm"]);
    expect(s.position(68)).toBeCloseTo(0.5, 12);
    expect(s.position(200)).toBe(1);
  });

  it("dB re 1 rpm: 20·log10(A/1 rpm), the top rounded up, DB_RANGE below it", () => {
    // 100 rpm is 40 dB re 1 rpm, 1 rpm is 0 dB (definition of the level of a field quantity).
    const s = levelScale("dB", 100);
    expect(s.max).toBe(40);
    expect(s.min).toBe(40 - DB_RANGE);
    expect(s.position(100)).toBeCloseTo(1, 12);
    expect(s.position(1)).toBeCloseTo((0 - s.min) / DB_RANGE, 12);
    // Below the range and zero both sit at the bottom.
    expect(s.position(1e-6)).toBe(0);
    expect(s.position(0)).toBe(0);
  });

  it("one maximum across both maps (shared scale)", () => {
    const crank = [
      [0, 3],
      [5, 1],
    ];
    const gearbox = [[0, 7.5]];
    expect(mapMaximum([crank, gearbox])).toBe(7.5);
    expect(mapMaximum([])).toBe(0);
  });

  it("leaves the columns below the first one counted out of the maximum", () => {
    const map = [
      [90, 3],
      [50, 4],
    ];
    expect(mapMaximum([map], 1)).toBe(4);
    expect(mapMaximum([map])).toBe(90);
  });
});
