import { describe, expect, it } from "vitest";
import { findSegments, trendOf } from "./segments.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;

/**
 * Piecewise-linear speed profile (analytic): [time s, rpm] corners, sampled at fs with a small
 * firing ripple (15 rpm at 27 Hz) and an optional slow wander w(t) in rpm added on top.
 */
function profile(
  corners: [number, number][],
  fs = 500,
  wander: (t: number) => number = () => 0,
): { timeS: Float64Array; crankRadS: Float64Array } {
  const end = corners[corners.length - 1]![0];
  const n = Math.round(end * fs) + 1;
  const timeS = new Float64Array(n);
  const crankRadS = new Float64Array(n);
  let j = 0;
  for (let i = 0; i < n; i++) {
    const t = i / fs;
    while (j < corners.length - 2 && t > corners[j + 1]![0]) j++;
    const [t0, r0] = corners[j]!;
    const [t1, r1] = corners[j + 1]!;
    const rpm = r0 + ((r1 - r0) * (t - t0)) / (t1 - t0) + wander(t);
    timeS[i] = t;
    crankRadS[i] = (rpm + (rpm > 0 ? 15 * Math.sin(2 * Math.PI * 27 * t) : 0)) * RAD_PER_RPM;
  }
  return { timeS, crankRadS };
}

const kinds = (p: ReturnType<typeof profile>) =>
  findSegments(p.timeS, p.crankRadS).map((s) => s.kind);

// The definition under test (docs/signal-computation.md, step 12): steady = at least 3 s within a
// band ±B, B = max(25 rpm, 2 % of the speed), with no trend; everything that is neither steady nor
// a start is a run-up or a coast-down by the direction the speed moves. Boundaries are checked
// within 0.8 s (the 1 s smoothing window plus one frame), or, where a hold is entered by a ramp,
// within B / ramp rate more (a ramp's last B rpm cannot be told from the hold's band).
describe("operating segments (analytic speed profiles)", () => {
  it("idle → run-up → steady → coast-down → idle", () => {
    const p = profile([
      [0, 800],
      [10, 800],
      [20, 3000],
      [30, 3000],
      [40, 800],
      [52, 800],
    ]);
    const seg = findSegments(p.timeS, p.crankRadS);
    expect(seg.map((s) => s.kind)).toEqual(["idle", "run-up", "steady", "coast-down", "idle"]);
    const bounds = seg.slice(1).map((s) => s.startS);
    [10, 20, 30, 40].forEach((b, i) => expect(Math.abs(bounds[i]! - b)).toBeLessThan(0.8));
    expect(Math.abs(seg[0]!.meanRpm - 800)).toBeLessThan(5);
    expect(Math.abs(seg[2]!.meanRpm - 3000)).toBeLessThan(5);
  });

  it("a 300 s slow sweep 800 → 4000 → 800 rpm (21 rpm/s) is a run-up then a coast-down, turning at 150 s", () => {
    const p = profile([
      [0, 800],
      [150, 4000],
      [300, 800],
    ]);
    const seg = findSegments(p.timeS, p.crankRadS);
    expect(seg.map((s) => s.kind)).toEqual(["run-up", "coast-down"]);
    expect(Math.abs(seg[1]!.startS - 150)).toBeLessThan(0.8);
    expect(seg[0]!.startS).toBe(0);
    expect(seg[1]!.endS).toBe(300);
  });

  it("sweeps at 5 rpm/s are still a run-up and a coast-down (no rate makes a monotone sweep steady)", () => {
    expect(
      kinds(
        profile([
          [0, 800],
          [240, 2000],
        ]),
      ),
    ).toEqual(["run-up"]);
    expect(
      kinds(
        profile([
          [0, 2000],
          [240, 800],
        ]),
      ),
    ).toEqual(["coast-down"]);
  });

  it("a 20 s hold at 4000 rpm wandering ±1.5 % between two slow sweeps is steady (B = 80 rpm: boundaries within 0.8 s + 80/21.3 s)", () => {
    const p = profile(
      [
        [0, 800],
        [150, 4000],
        [170, 4000],
        [320, 800],
      ],
      500,
      (t) => (t > 150 && t < 170 ? 60 * Math.sin((2 * Math.PI * (t - 150)) / 5) : 0),
    );
    const seg = findSegments(p.timeS, p.crankRadS);
    expect(seg.map((s) => s.kind)).toEqual(["run-up", "steady", "coast-down"]);
    const tol = 0.8 + 80 / 21.3;
    expect(Math.abs(seg[1]!.startS - 150)).toBeLessThan(tol);
    expect(Math.abs(seg[1]!.endS - 170)).toBeLessThan(tol);
    expect(Math.abs(seg[1]!.meanRpm - 4000)).toBeLessThan(30);
  });

  it("a 30 s hold at 2500 rpm with ±1.5 % wander (inside the ±2 % band) is one steady segment", () => {
    const p = profile(
      [
        [0, 800],
        [10, 800],
        [18.5, 2500],
        [48.5, 2500],
        [57, 800],
        [70, 800],
      ],
      500,
      (t) => (t > 18.5 && t < 48.5 ? 37.5 * Math.sin((2 * Math.PI * (t - 18.5)) / 7.5) : 0),
    );
    const seg = findSegments(p.timeS, p.crankRadS);
    expect(seg.map((s) => s.kind)).toEqual(["idle", "run-up", "steady", "coast-down", "idle"]);
    const tol = 0.8 + 50 / 200; // B = 50 rpm at 2500, ramps 200 rpm/s
    expect(Math.abs(seg[2]!.startS - 18.5)).toBeLessThan(tol);
    expect(Math.abs(seg[2]!.endS - 48.5)).toBeLessThan(tol);
  });

  it("the same hold wandering ±4 % (outside the band) is not steady", () => {
    const p = profile(
      [
        [0, 2500],
        [60, 2500],
      ],
      500,
      (t) => 100 * Math.sin((2 * Math.PI * t) / 20),
    );
    const k = kinds(p);
    expect(k).not.toContain("steady");
    expect(new Set(k)).toEqual(new Set(["run-up", "coast-down"]));
  });

  it("idle: 60 s at 800 rpm with ±10 rpm wander is one idle segment at 800 rpm (±5 rpm)", () => {
    const p = profile(
      [
        [0, 800],
        [60, 800],
      ],
      500,
      (t) => 10 * Math.sin((2 * Math.PI * t) / 4),
    );
    const seg = findSegments(p.timeS, p.crankRadS);
    expect(seg.map((s) => s.kind)).toEqual(["idle"]);
    expect(Math.abs(seg[0]!.meanRpm - 800)).toBeLessThan(5);
  });

  it("engine start: standstill, cranking, flare to idle → start then idle", () => {
    const p = profile([
      [0, 0],
      [0.5, 0],
      [1, 220],
      [2.5, 250],
      [3.5, 1100],
      [4.5, 820],
      [20, 820],
    ]);
    const seg = findSegments(p.timeS, p.crankRadS);
    expect(seg.map((s) => s.kind)).toEqual(["start", "idle"]);
    expect(Math.abs(seg[1]!.startS - 4.5)).toBeLessThan(0.8);
  });

  it("key-off: idle, coast to standstill, 2 s at 0 rpm (too short to be steady) → idle then coast-down", () => {
    const p = profile([
      [0, 800],
      [15, 800],
      [17, 0],
      [19, 0],
    ]);
    const seg = findSegments(p.timeS, p.crankRadS);
    expect(seg.map((s) => s.kind)).toEqual(["idle", "coast-down"]);
    expect(seg[1]!.endS).toBe(19);
  });

  it("a slow climb from low speed is a run-up, not a start", () => {
    const p = profile([
      [0, 300],
      [60, 3000],
    ]);
    expect(kinds(p)).toEqual(["run-up"]);
  });

  it("short blips are merged away (shorter than 1.5 s)", () => {
    const p = profile([
      [0, 800],
      [10, 800],
      [10.4, 900],
      [10.8, 800],
      [25, 800],
    ]);
    expect(kinds(p)).toEqual(["idle"]);
  });
});

describe("trend of a stretch: least-squares parabola and line", () => {
  const parabolaSpan = (y: Float64Array, a: number, b: number) => trendOf(y, a, b).span;
  const grid = (f: (x: number) => number, n = 101) =>
    Float64Array.from({ length: n }, (_, i) => f(-1 + (2 * i) / (n - 1)));
  it("a line's span is its rise, a parabola's is its own, a constant's is 0 (exact fits; 1e-9)", () => {
    expect(
      Math.abs(
        parabolaSpan(
          grid((x) => 7 + 30 * x),
          0,
          101,
        ) - 60,
      ),
    ).toBeLessThan(1e-9);
    expect(
      Math.abs(
        parabolaSpan(
          grid((x) => 5 * x * x),
          0,
          101,
        ) - 5,
      ),
    ).toBeLessThan(1e-9);
    expect(
      parabolaSpan(
        grid(() => 3),
        0,
        101,
      ),
    ).toBeLessThan(1e-9);
    expect(
      Math.abs(
        trendOf(
          grid((x) => 7 + 30 * x + 4 * x * x),
          0,
          101,
        ).rise - 60,
      ),
    ).toBeLessThan(1e-9);
  });
  it("the turn |x| of an up-and-down sweep spans 15/16 of its height (Legendre expansion of |x|: 1/2 + 5/8·P2 [computed]; 1 %)", () => {
    expect(
      Math.abs(
        parabolaSpan(
          grid((x) => Math.abs(x), 2001),
          0,
          2001,
        ) /
          (15 / 16) -
          1,
      ),
    ).toBeLessThan(0.01);
  });
});
