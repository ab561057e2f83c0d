import { describe, expect, it } from "vitest";
import { analyseDriveLog } from "./analyse.ts";
import { ingestCsv } from "./ingest.ts";
import type { SpeedUnit, TimeUnit } from "./types.ts";

// One analytic signal (a constant 1500 rpm with an order-2 fluctuation, 10 rpm 0-peak on the
// crank and 3 rpm on the gearbox side, 2 kHz, 6 s) written in every unit, delimiter, decimal
// style and time unit. Expected values come from the formula, converted with the SI unit
// definitions (1 rpm = 2π/60 rad/s, 1 deg/s = π/180 rad/s, 1 rev/s = 2π rad/s, 1 ms = 1e-3 s).
const FS = 2000;
const N = 6 * FS;
const W = (1500 * 2 * Math.PI) / 60; // rad/s
const crankAt = (t: number) => W + ((10 * 2 * Math.PI) / 60) * Math.sin(2 * W * t);
const gearAt = (t: number) => W + ((3 * 2 * Math.PI) / 60) * Math.sin(2 * W * t - 0.4);
const PER_RAD_S: Record<SpeedUnit, number> = {
  rpm: 60 / (2 * Math.PI),
  "rad/s": 1,
  "deg/s": 180 / Math.PI,
  "rev/s": 1 / (2 * Math.PI),
};

interface Form {
  unit: SpeedUnit;
  delimiter: "," | ";" | "\t";
  decimal: "." | ",";
  timeUnit: TimeUnit;
}

/** The signal as CSV text in the given form; 12 significant digits per value. */
function write(f: Form): string {
  const num = (x: number) =>
    f.decimal === "," ? x.toPrecision(12).replace(".", ",") : x.toPrecision(12);
  const d = f.delimiter;
  const lines = [
    `time [${f.timeUnit}]${d}crank speed [${f.unit}]${d}gearbox input speed [${f.unit}]`,
  ];
  for (let i = 0; i < N; i++) {
    const t = i / FS;
    const tv = f.timeUnit === "ms" ? i / 2 : t; // exact in both units: 0.5 ms steps
    lines.push(
      [num(tv), num(crankAt(t) * PER_RAD_S[f.unit]), num(gearAt(t) * PER_RAD_S[f.unit])].join(d),
    );
  }
  return `${lines.join("\n")}\n`;
}

const FORMS: Form[] = [];
for (const unit of ["rpm", "rad/s", "deg/s", "rev/s"] as const)
  for (const [delimiter, decimal] of [
    [",", "."],
    [";", "."],
    [";", ","],
    ["\t", "."],
    ["\t", ","],
  ] as const)
    for (const timeUnit of ["s", "ms"] as const) FORMS.push({ unit, delimiter, decimal, timeUnit });

const logs = FORMS.map((f) => ({ f, r: ingestCsv(write(f)) }));

describe("the same signal in every written form gives the same DriveLog", () => {
  it.each(
    logs.map(
      ({ f, r }) => [`${f.unit} '${f.delimiter}' '${f.decimal}' ${f.timeUnit}`, f, r] as const,
    ),
  )("%s", (_, f, r) => {
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.source).toMatchObject({
      delimiter: f.delimiter,
      decimal: f.decimal,
      crankUnit: f.unit,
      gearboxUnit: f.unit,
      timeUnit: f.timeUnit,
      rows: N,
    });
    const { timeS, crankRadS, gearboxRadS } = r.value;
    // 12 written digits: relative rounding ≤ 5e-12; allow 1e-10 relative, 1e-12 s absolute.
    for (let i = 0; i < N; i += 97) {
      const t = i / FS;
      expect(Math.abs((timeS[i] ?? NaN) - t)).toBeLessThanOrEqual(1e-12);
      expect(Math.abs((crankRadS[i] ?? NaN) - crankAt(t)) / W).toBeLessThanOrEqual(1e-10);
      expect(Math.abs((gearboxRadS[i] ?? NaN) - gearAt(t)) / W).toBeLessThanOrEqual(1e-10);
    }
    expect(r.value.sampleRateHz).toBeCloseTo(FS, 6);
  });
});

/** Every number in a equals the one in b within tol + 1e-6·|a|; the same shape otherwise. */
function expectClose(a: unknown, b: unknown, tol: number, path = "result"): void {
  if (typeof a === "number" && typeof b === "number") {
    if (Math.abs(a - b) > tol + 1e-6 * Math.abs(a)) throw new Error(`${path}: ${a} vs ${b}`);
    return;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    expect(b.length, path).toBe(a.length);
    a.forEach((x, i) => expectClose(x, b[i], tol, `${path}[${i}]`));
    return;
  }
  if (a && b && typeof a === "object" && typeof b === "object") {
    expect(Object.keys(b).sort(), path).toEqual(Object.keys(a).sort());
    for (const k of Object.keys(a))
      expectClose(
        (a as Record<string, unknown>)[k],
        (b as Record<string, unknown>)[k],
        tol,
        `${path}.${k}`,
      );
    return;
  }
  expect(b, path).toEqual(a);
}

describe("… and the same analysis result", () => {
  const reference = logs[0];
  it("reference form analyses", () => {
    expect(reference?.r.ok).toBe(true);
  });
  const base = reference?.r.ok ? analyseDriveLog(reference.r.value) : undefined;
  it.each(
    logs
      .slice(1)
      .map(({ f, r }) => [`${f.unit} '${f.delimiter}' '${f.decimal}' ${f.timeUnit}`, r] as const),
  )("%s", (_, r) => {
    expect(base?.ok).toBe(true);
    if (!r.ok || !base?.ok) throw new Error("ingest or analysis failed");
    const result = analyseDriveLog(r.value);
    expect(result.ok).toBe(true);
    // Results are rounded to at most 3 decimals; inputs differ by ≤ 1e-10 relative, so a value
    // may flip one rounding step: 0.0011 absolute (+1e-6 relative).
    // The `source` block names the file's own columns and units, which differ by design.
    const { source: _a, ...want } = base.value;
    if (result.ok) {
      const { source: _b, ...got } = result.value;
      expectClose(want, got, 0.0011);
    }
  });
});
