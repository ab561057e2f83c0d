import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { columnStats, joinStats } from "./ingest-checks.ts";

// The stats of a log gathered per half and joined (the two-thread ingest) against one pass over
// the whole log (columnStats, the definition): every extreme the same; the revolutions and the
// gearbox sum, sums grouped differently, within rounding; with a NaN dropout none (one pass).
describe("joinStats", () => {
  it("gives one pass's stats from the stats of two halves", () => {
    const value = fc.oneof(
      { weight: 20, arbitrary: fc.double({ min: -50, max: 900, noNaN: true }) },
      { weight: 1, arbitrary: fc.constant(NaN) },
    );
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: 1e-4, max: 0.01, noNaN: true }), value, value), {
          minLength: 2,
          maxLength: 200,
        }),
        fc.nat(),
        (rows, cut) => {
          const n = rows.length;
          const t = new Float64Array(n);
          const c = Float64Array.from(rows.map((r) => r[1]));
          const g = Float64Array.from(rows.map((r) => r[2]));
          for (let i = 1; i < n; i++) t[i] = t[i - 1]! + rows[i]![0];
          const k = 1 + (cut % (n - 1)); // both halves hold a sample
          const whole = columnStats(t, c, g);
          const [a, b] = [0, k].map((s) => {
            const e = s === 0 ? k : n;
            return columnStats(t.subarray(s, e), c.subarray(s, e), g.subarray(s, e));
          });
          const joined = joinStats(a!, b!, t[k - 1]!, c[k - 1]!, t[k]!, c[k]!);
          // A dropout (NaN) in either half: no joined stats, one pass decides.
          if (!(Number.isFinite(whole.revRad) && Number.isFinite(whole.sumG))) {
            expect(joined).toBeUndefined();
            return;
          }
          const { revRad, sumG, ...extremes } = joined!;
          const { revRad: wantRev, sumG: wantG, ...wantExtremes } = whole;
          expect(extremes).toEqual(wantExtremes);
          expect(Math.abs(sumG - wantG)).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(wantG)));
          expect(Math.abs(revRad - wantRev)).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(wantRev)));
        },
      ),
      { numRuns: 400 },
    );
  });
});
