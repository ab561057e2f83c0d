import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { indexAtAngle } from "./angle-grid.ts";

// The angle search against its definition: the last index i ≤ n − 2 with angle[i] ≤ theta (0
// when none), found by a direct scan, on random non-decreasing angles with plateaus (standstill)
// and for any hint at or below the answer, or past it (the search then starts again at 0).
describe("indexAtAngle", () => {
  it("finds the last sample at or before the angle, whatever the hint", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 3 }), { minLength: 1, maxLength: 400 }),
        fc.double({ min: -5, max: 700, noNaN: true }),
        fc.nat(),
        (steps, theta, rawHint) => {
          const angle = new Float64Array(steps.length);
          for (let i = 1; i < steps.length; i++) angle[i] = angle[i - 1]! + steps[i]!;
          let want = 0;
          for (let i = 0; i <= Math.max(0, angle.length - 2); i++) if (angle[i]! <= theta) want = i;
          const hint = rawHint % (angle.length + 2);
          expect(indexAtAngle(angle, theta, hint)).toBe(want);
        },
      ),
      { numRuns: 500 },
    );
  });
});
