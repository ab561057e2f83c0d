import { describe, expect, it } from "vitest";
import { findSegments } from "./segments.ts";

const RAD_PER_RPM = (2 * Math.PI) / 60;

/** Piecewise-linear speed profile (analytic): [time s, rpm] corners, sampled at fs with a small firing ripple. */
function profile(
  corners: [number, number][],
  fs = 500,
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
    const rpm = r0 + ((r1 - r0) * (t - t0)) / (t1 - t0);
    timeS[i] = t;
    crankRadS[i] = (rpm + (rpm > 0 ? 15 * Math.sin(2 * Math.PI * 27 * t) : 0)) * RAD_PER_RPM;
  }
  return { timeS, crankRadS };
}

describe("operating segments (analytic speed profiles; boundaries within 0.8 s — the 1 s smoothing window plus one frame)", () => {
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

  it("a slow climb from low speed is a run-up, not a start", () => {
    const p = profile([
      [0, 300],
      [60, 3000],
    ]);
    expect(findSegments(p.timeS, p.crankRadS).map((s) => s.kind)).toEqual(["run-up"]);
  });

  it("short blips are merged away (shorter than 1.5 s)", () => {
    const p = profile([
      [0, 800],
      [10, 800],
      [10.4, 900],
      [10.8, 800],
      [25, 800],
    ]);
    expect(findSegments(p.timeS, p.crankRadS).map((s) => s.kind)).toEqual(["idle"]);
  });
});
