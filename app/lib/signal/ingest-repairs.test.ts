/**
 * Repairs of dropouts, missing rows and jitter (issue 14 §2), on analytic drive logs
 * (tests/support/ripple-csv.ts): a steady 3000 rpm crank with a sine ripple at the
 * firing order 2 (100 Hz) of 30 rpm 0-peak, the gearbox the same ripple at 3 rpm, sampled at
 * 2 kHz. The truth is the isolation of the unrepaired, clean log, which by the definition
 * isolation = 20·log10(crank / gearbox amplitude) (docs/signal-computation.md, step 9) is
 * 20·log10(30/3) = 20 dB.
 */
import { describe, expect, it } from "vitest";
import { analyseDriveLog } from "./analyse.ts";
import { ingestCsv } from "./ingest.ts";
import { timeQuantum } from "./ingest-repairs.ts";
import type { DriveLog } from "./types.ts";
import { RIPPLE, rippleCsv } from "../../../tests/support/ripple-csv.ts";

const { fs: FS, rpm: RPM } = RIPPLE;
const csv = rippleCsv;
/** Data row i (0-based) is file row i + 2 (the header is row 1). */
const rowOf = (i: number) => i + 2;

function ingestOk(text: string, options = {}) {
  const r = ingestCsv(text, options);
  if (!r.ok) throw new Error(`expected a log: ${r.error.message}`);
  return r;
}

/** Isolation at the 3000 rpm bin, dB. */
function isolationDb(log: DriveLog): number {
  const r = analyseDriveLog(log, { cylinders: 4 });
  if (!r.ok) throw new Error(r.error.message);
  const p = r.value.isolation.find((x) => x.rpm === RPM);
  if (!p) throw new Error("no 3000 rpm bin");
  return p.dB;
}

const truth = isolationDb(ingestOk(csv(4)).value);

describe("the truth", () => {
  it("the clean log's isolation is 20·log10(30/3) = 20 dB (definition, signal-computation step 9)", () => {
    expect(Math.abs(truth - 20)).toBeLessThan(0.3);
  });
  it("a clean log is not touched: no repairs, no sections, the arrays as read", () => {
    const r = ingestOk(csv(4));
    expect(r.value.source.repairs).toEqual([]);
    expect(r.value.sections).toBeUndefined();
    expect(r.value.timeS.length).toBe(4 * FS);
  });
});

describe("dropouts: empty or non-finite speed cells", () => {
  // Rows 3001–3003 (data lines 2999–3001): three gearbox cells empty, as in issue 14.
  const text = csv(4, {
    edit: (i, l) => (i >= 2999 && i <= 3001 ? l.replace(/,[^,]*$/, ",") : l),
  });
  it("are filled, listed with their rows and span, and warned about", () => {
    const r = ingestOk(text);
    const [rep] = r.value.source.repairs ?? [];
    expect(rep).toMatchObject({
      code: "dropout_filled",
      count: 3,
      rows: [{ from: rowOf(2999), to: rowOf(3001) }],
    });
    expect(rep!.fromS).toBeCloseTo(2999 / FS, 6);
    expect(rep!.toS).toBeCloseTo(3001 / FS, 6);
    const w = r.warnings.find((x) => x.code === "dropout_filled");
    expect(w?.message).toContain(`rows ${rowOf(2999)}–${rowOf(3001)}`);
    expect(w?.message).toContain('"gearbox input speed [rpm]"');
    expect(r.value.timeS.length).toBe(4 * FS);
    expect(r.value.gearboxRadS.every(Number.isFinite)).toBe(true);
  });
  it("the filled values lie on the straight line between the neighbours (linear in time)", () => {
    const g = ingestOk(text).value.gearboxRadS;
    const [a, b] = [g[2998]!, g[3002]!];
    for (let k = 1; k <= 3; k++) expect(g[2998 + k]).toBeCloseTo(a + ((b - a) * k) / 4, 9);
  });
  it("keep the isolation within 0.3 dB of the truth", () => {
    expect(Math.abs(isolationDb(ingestOk(text).value) - truth)).toBeLessThan(0.3);
  });
  it.each(["NaN", "inf", "-Infinity"])("%s in the crank is a dropout too", (word) => {
    const r = ingestOk(
      csv(4, { edit: (i, l) => (i === 500 ? l.replace(/,[^,]*,/, `,${word},`) : l) }),
    );
    expect(r.value.source.repairs?.[0]).toMatchObject({ code: "dropout_filled", count: 1 });
    expect(r.warnings.find((x) => x.code === "dropout_filled")?.message).toContain(
      `(row ${rowOf(500)}; at 0.25 s)`,
    );
  });
  it("text that is not a number stays an error (a wrong column or decimal mark)", () => {
    const r = ingestCsv(csv(1, { edit: (i, l) => (i === 50 ? l.replace(/,[^,]*$/, ",n/a") : l) }));
    expect(r.ok ? null : r.error).toMatchObject({ code: "not_numeric", row: rowOf(50) });
  });
  it("at the start of the log cannot be interpolated and are left out with a warning", () => {
    const r = ingestOk(csv(4, { edit: (i, l) => (i < 3 ? l.replace(/,[^,]*$/, ",") : l) }));
    expect(r.value.timeS.length).toBe(4 * FS - 3);
    expect(r.value.timeS[0]).toBeCloseTo(3 / FS, 9);
    expect(r.warnings.find((x) => x.code === "dropout_left_out")?.row).toBe(rowOf(0));
  });
});

describe("missing rows (a short gap in the time)", () => {
  // Six rows missing at 2 kHz, a 3 ms gap as in issue 14: data lines 4000–4005.
  const text = csv(4, { edit: (i, l) => (i >= 4000 && i <= 4005 ? null : l) });
  it("are inserted on the nominal grid and listed with the rows either side and the span", () => {
    const r = ingestOk(text);
    const rep = r.value.source.repairs?.find((x) => x.code === "missing_rows_filled");
    // The file rows either side of the gap: data line 3999 is row 4001, line 4006 row 4002.
    expect(rep).toMatchObject({ count: 6, rows: [{ from: 4001, to: 4002 }] });
    expect(rep!.fromS).toBeCloseTo(3999 / FS, 6);
    expect(rep!.toS).toBeCloseTo(4006 / FS, 6);
    expect(r.warnings.some((w) => w.code === "missing_rows_filled")).toBe(true);
    const t = r.value.timeS;
    expect(t.length).toBe(4 * FS);
    for (let i = 1; i < t.length; i++)
      expect(Math.abs(t[i]! - t[i - 1]! - 1 / FS)).toBeLessThan(1e-9);
    expect(r.value.sections).toBeUndefined();
  });
  it("keep the isolation within 0.3 dB of the truth", () => {
    expect(Math.abs(isolationDb(ingestOk(text).value) - truth)).toBeLessThan(0.3);
  });
  it("a row without a time is left out and filled as a missing row", () => {
    const r = ingestOk(csv(4, { edit: (i, l) => (i === 100 ? l.replace(/^[^,]*/, "") : l) }));
    const rep = r.value.source.repairs?.find((x) => x.code === "missing_rows_filled");
    expect(rep).toMatchObject({ count: 1, rows: [{ from: rowOf(99), to: rowOf(101) }] });
  });
});

describe.each([0.02, 0.2])("timestamps with ±%s jitter of the interval", (jitter) => {
  const text = csv(4, { jitter });
  it("are resampled onto a uniform grid, the repair listed", () => {
    const r = ingestOk(text);
    const rep = r.value.source.repairs?.find((x) => x.code === "jitter_resampled");
    expect(rep?.count).toBeGreaterThan(100);
    expect(rep?.rows[0]?.from).toBeGreaterThanOrEqual(rowOf(1));
    expect(rep!.rows.length).toBeLessThanOrEqual(50);
    const t = r.value.timeS;
    for (let i = 1; i < t.length; i++)
      expect(Math.abs(t[i]! - t[i - 1]! - 1 / FS)).toBeLessThan(1e-9);
  });
  it("keep the isolation within 0.3 dB of the truth", () => {
    expect(Math.abs(isolationDb(ingestOk(text).value) - truth)).toBeLessThan(0.3);
  });
  it("the resampled crank matches the analytic speed at the grid times (cubic, not linear)", () => {
    // Lagrange remainder f⁗·∏(τ − tᵢ)/4! with nodes within 1.5 intervals: under
    // 30 rpm · (ωh)⁴ · 0.0234 = 0.007 rpm for ωh = 2π·100/2000; a line would be off by up to
    // 30 rpm · (ωh)²/8 = 0.37 rpm. Plus 0.00005 rpm of the written 4 decimals.
    const log = ingestOk(text).value;
    const w = (2 * Math.PI * RPM) / 60;
    let worst = 0;
    for (let i = 0; i < log.timeS.length; i++) {
      const rpm = RPM + 30 * Math.cos(2 * w * log.timeS[i]!);
      worst = Math.max(worst, Math.abs((log.crankRadS[i]! * 60) / (2 * Math.PI) - rpm));
    }
    expect(worst).toBeLessThan(0.01);
  });
});

describe("rounding is not jitter", () => {
  it("1500 Hz written to 10 µs (intervals 660 and 670 µs, 1.5 % off) is read as written", () => {
    // Every time is a whole multiple of the written step: the rounding of a uniform grid.
    const lines: string[] = [RIPPLE.header];
    for (let i = 0; i < 3000; i++) lines.push(`${(i / 1500).toFixed(5)},3000,2990`);
    const r = ingestOk(`${lines.join("\n")}\n`);
    expect(r.value.source.repairs).toEqual([]);
    expect(r.value.timeS[1]).toBe(0.00067);
  });
  it("timeQuantum finds the written step", () => {
    expect(timeQuantum(Float64Array.from([0, 0.00067, 0.00133, 0.002]))).toBeCloseTo(1e-5, 12);
    expect(timeQuantum(Float64Array.from([0, 0.5, 1, 1.5]))).toBeCloseTo(0.1, 12);
  });
});

describe("what cannot be repaired", () => {
  it("intervals off by more than 25 % (and no gap) stay irregular_sampling", () => {
    // Data line 40 comes 0.15 ms late at 0.5 ms: intervals +30 % and −30 %.
    const text = csv(1, {
      edit: (i, l) => (i === 40 ? l.replace(/^[^,]*/, (40.3 / FS).toFixed(7)) : l),
    });
    const r = ingestCsv(text);
    expect(r.ok ? null : r.error).toMatchObject({ code: "irregular_sampling", row: rowOf(40) });
  });
  it("every speed empty is an error, not an empty log", () => {
    const r = ingestCsv(csv(0.1, { edit: (_, l) => l.replace(/,[^,]*$/, ",") }));
    expect(r.ok ? null : r.error.code).toBe("no_speed_values");
  });
});
