import { describe, expect, it } from "vitest";
import { extent, formatValue, nearestIndex, niceTicks, withGaps } from "./chart-math";

describe("nearestIndex", () => {
  const rows = [800, 850, 900, 1000];
  it("finds the nearest row by |x − row| (definition)", () => {
    expect(nearestIndex(rows, 812)).toBe(0);
    expect(nearestIndex(rows, 838)).toBe(1);
    expect(nearestIndex(rows, 960)).toBe(3);
    expect(nearestIndex(rows, -5)).toBe(0);
    expect(nearestIndex(rows, 9000)).toBe(3);
  });
  it("takes the lower row on a tie and −1 for nothing to find", () => {
    expect(nearestIndex(rows, 825)).toBe(0);
    expect(nearestIndex([], 825)).toBe(-1);
    expect(nearestIndex(rows, Number.NaN)).toBe(-1);
  });
  it("agrees with a linear scan on many points", () => {
    const xs = Array.from({ length: 57 }, (_, i) => i * 37.5 + (i % 3));
    for (let x = -50; x < 2200; x += 13.7) {
      let best = 0;
      xs.forEach((v, i) => {
        if (Math.abs(v - x) < Math.abs(xs[best]! - x)) best = i;
      });
      expect(nearestIndex(xs, x)).toBe(best);
    }
  });
});

describe("niceTicks (nearest 1-2-5 step, Heckbert, Graphics Gems 1990)", () => {
  it("covers the range with the 1, 2 or 5 × 10ⁿ step nearest to range/count", () => {
    // 8/8 = 1 → 1; 3300/6 = 550 → 500; 43/5 = 8.6 → 10; 0.3/3 = 0.1 → 0.1.
    expect(niceTicks(0, 8, 8)).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8]);
    expect(niceTicks(1075, 4375, 6)).toEqual([1500, 2000, 2500, 3000, 3500, 4000]);
    expect(niceTicks(-12, 31, 5)).toEqual([-10, 0, 10, 20, 30]);
    expect(niceTicks(0, 0.3, 3)).toEqual([0, 0.1, 0.2, 0.3]);
  });
  it("handles a single value and bad input", () => {
    expect(niceTicks(5, 5)).toEqual([5]);
    expect(niceTicks(Number.NaN, 1)).toEqual([]);
  });
});

describe("withGaps", () => {
  it("puts a null between samples further apart than 3× the median step", () => {
    const out = withGaps([0, 1, 2, 3, 10, 11], [[5, 6, 7, 8, 9, 10]]);
    expect(out.x).toEqual([0, 1, 2, 3, 6.5, 10, 11]);
    expect(out.ys[0]).toEqual([5, 6, 7, 8, null, 9, 10]);
  });
  it("leaves evenly spaced data alone", () => {
    expect(withGaps([0, 0.3, 0.6], [[1, 2, 3]]).ys[0]).toEqual([1, 2, 3]);
  });
});

describe("extent and formatValue", () => {
  it("extent skips gaps", () => {
    expect(extent([3, null, -2], [7])).toEqual([-2, 7]);
    expect(extent([null])).toBeNull();
  });
  it("formats with 4 significant digits and a true minus sign", () => {
    expect(formatValue(15.1234)).toBe("15.12");
    expect(formatValue(-10.89)).toBe("−10.89");
    expect(formatValue(4350)).toBe("4350");
    expect(formatValue(123456)).toBe("123456");
    expect(formatValue(0.00012)).toBe("1.200e-4");
    expect(formatValue(null)).toBe("—");
  });
});
