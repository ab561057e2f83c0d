/**
 * The windowed zero-phase low-pass (filtered-window.ts) against filtfilt over the whole signal
 * (lowpass.ts). The margin comes from the biquads' pole radius r: a start-up error decays as r^k
 * after k samples (the natural response of a recursive filter, Oppenheim & Schafer, Discrete-Time
 * Signal Processing, ch. 5), so with the margin the window's middle must agree within 1e-9 of
 * the signal (issue 17's bound), and with a quarter of it must not.
 */
import { describe, expect, it } from "vitest";
import { butterworthLowpass4, filtfilt } from "../lowpass.ts";
import { filterMargin, filterWindow } from "./filtered-window.ts";

const FS = 10_000;
const N = 40_000;
/** A test signal: three tones and uniform noise (fixed seed), amplitude about 100. */
const x = (() => {
  const out = new Float64Array(N);
  let seed = 5;
  for (let i = 0; i < N; i++) {
    seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
    const t = i / FS;
    out[i] =
      80 +
      10 * Math.sin(2 * Math.PI * 13 * t) +
      5 * Math.sin(2 * Math.PI * 170 * t) +
      3 * Math.sin(2 * Math.PI * 900 * t) +
      4 * (seed / 2 ** 32 - 0.5);
  }
  return out;
})();

/** Largest |window middle − whole| over [a, b) with `margin` samples read either side. */
function worst(
  sections: ReturnType<typeof butterworthLowpass4>,
  a: number,
  b: number,
  margin: number,
) {
  const whole = filtfilt(x, sections);
  const r0 = Math.max(0, a - margin);
  const r1 = Math.min(N, b + margin);
  const y = filterWindow(x.slice(r0, r1), sections);
  let d = 0;
  for (let i = a; i < b; i++) d = Math.max(d, Math.abs(y[i - r0]! - whole[i]!));
  return d;
}

describe("the windowed low-pass", () => {
  for (const fc of [200, 1000, 3000])
    it(`equals filtfilt of the whole signal within 1e-9 of it (fc ${fc} Hz at ${FS} Hz)`, () => {
      const s = butterworthLowpass4(fc, FS);
      const m = filterMargin(s);
      const bound = 1e-9 * 100;
      expect(worst(s, 15_000, 18_000, m)).toBeLessThan(bound);
      // At the signal's own ends no margin exists: the edge handling must be the batch one's.
      expect(worst(s, 0, 3000, m)).toBeLessThan(bound);
      expect(worst(s, N - 3000, N, m)).toBeLessThan(bound);
      // A quarter of the margin leaves the start-up visible (so the margin is what makes it equal).
      expect(worst(s, 15_000, 18_000, Math.floor(m / 4))).toBeGreaterThan(bound);
    });

  it("needs no margin without a filter", () => expect(filterMargin([])).toBe(0));
});
