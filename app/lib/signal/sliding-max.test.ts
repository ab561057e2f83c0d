import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { slidingMax } from "./sliding-max.ts";

// The running maximum against its definition, max over x[i − half … i + half], computed by the
// direct double loop (what rattle.ts did before), on random data with ties and plateaus.
describe("slidingMax", () => {
  it("equals the direct maximum over every centred window", () => {
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: 0, max: 6 }), { minLength: 1, maxLength: 300 }),
        fc.integer({ min: 0, max: 20 }),
        (values, half) => {
          const x = Float64Array.from(values);
          const from = Math.min(half, x.length);
          const to = Math.max(from, x.length - half);
          const got = slidingMax(x, half, from, to);
          const want: number[] = [];
          for (let i = from; i < to; i++) {
            let m = -Infinity;
            for (let j = i - half; j <= i + half; j++) m = Math.max(m, x[j]!);
            want.push(m);
          }
          expect(Array.from(got)).toEqual(want);
        },
      ),
      { numRuns: 300 },
    );
  });
});
