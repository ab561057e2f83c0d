/**
 * Sections: a gap or dropout longer than the repair limit splits a log, and nothing is computed
 * across it (issue 14 §2). Analytic log from tests/support/ripple-csv.ts: 3000 rpm, ripple at
 * order 2 of 30 rpm on the crank and 3 rpm on the gearbox, 2 kHz, so the isolation is
 * 20·log10(30/3) = 20 dB by its definition (docs/signal-computation.md, step 9). Expected rows,
 * times and lengths are counted from the file each test builds.
 */
import { describe, expect, it } from "vitest";
import { RIPPLE, rippleCsv } from "../../../tests/support/ripple-csv.ts";
import { analyseDriveLog } from "./analyse.ts";
import { chooseAngleGrid } from "./angle-grid.ts";
import { finishLog } from "./ingest-finish.ts";
import { ingestCsv } from "./ingest.ts";
import { butterworthLowpass4 } from "./lowpass.ts";
import { trackSections } from "./section-analysis.ts";
import type { DriveLog } from "./types.ts";

const { fs: FS, rpm: RPM } = RIPPLE;

function ingestOk(text: string, options = {}) {
  const r = ingestCsv(text, options);
  if (!r.ok) throw new Error(`expected a log: ${r.error.message}`);
  return r;
}

// 100 rows (50 ms) missing after data line 3999 (t = 1.9995 s): over the 20-sample limit.
const GAP_FROM = 3999 / FS;
const GAP_TO = 4100 / FS;
const gapText = rippleCsv(4, { edit: (i, l) => (i >= 4000 && i < 4100 ? null : l) });

describe("a gap over the repair limit", () => {
  const r = ingestOk(gapText);
  const log = r.value;
  it("yields two sections either side of it, and a warning naming the rows", () => {
    expect(log.sections).toEqual([
      { startIndex: 0, endIndex: 4000, startS: 0, endS: GAP_FROM },
      { startIndex: 4000, endIndex: 7900, startS: GAP_TO, endS: 7999 / FS },
    ]);
    // Data line 3999 is file row 4001, data line 4100 (the next one in the file) row 4002.
    const w = r.warnings.find((x) => x.code === "log_split");
    expect(w?.message).toContain("between rows 4001 and 4002");
    expect(w?.message).toContain("100 samples missing");
    expect(log.source.repairs).toEqual([]);
  });
  it("no order-tracking block spans it (block start and end times against the gap)", () => {
    const grid = chooseAngleGrid({
      sampleRateHz: FS,
      maxRadS: ((RPM + 30) * 2 * Math.PI) / 60,
      topOrder: 6,
    });
    const filters = butterworthLowpass4(grid.lowPassHz!, FS);
    const { tracked } = trackSections(log, filters, {
      grid,
      revsPerBlock: 8,
      overlap: 0.5,
      topBin: 50,
    });
    expect(tracked!.blockCount).toBeGreaterThan(20);
    let before = 0;
    let after = 0;
    for (let b = 0; b < tracked!.blockCount; b++) {
      const s = tracked!.blockStartS[b]!;
      const e = tracked!.blockEndS[b]!;
      if (e <= GAP_FROM + 1e-9) before++;
      else if (s >= GAP_TO - 1e-9) after++;
      else throw new Error(`block ${b} (${s} s to ${e} s) spans the gap`);
    }
    expect(before).toBeGreaterThan(0);
    expect(after).toBeGreaterThan(0);
  });
  it("the result lists the sections, the speed trace breaks at the gap, isolation stays 20 dB", () => {
    const a = analyseDriveLog(log, { cylinders: 4 });
    if (!a.ok) throw new Error(a.error.message);
    expect(a.value.source?.sections).toEqual([
      { startS: 0, endS: GAP_FROM, samples: 4000 },
      { startS: GAP_TO, endS: 7999 / FS, samples: 3900 },
    ]);
    const trace = a.value.speedTrace!;
    const nulls = trace.crankRpm.flatMap((v, i) => (v === null ? [i] : []));
    expect(nulls).toHaveLength(1);
    const at = trace.timeS[nulls[0]!]!;
    expect(at).toBeGreaterThan(GAP_FROM);
    expect(at).toBeLessThan(GAP_TO);
    for (const s of a.value.segments)
      expect(s.endS <= GAP_FROM + 0.001 || s.startS >= GAP_TO - 0.001).toBe(true);
    const p = a.value.isolation.find((x) => x.rpm === RPM);
    expect(Math.abs(p!.dB - 20)).toBeLessThan(0.3);
  });
});

describe("a long dropout and the repair limit", () => {
  it("100 empty gearbox cells are left out and split the log", () => {
    const text = rippleCsv(4, {
      edit: (i, l) => (i >= 4000 && i < 4100 ? l.replace(/,[^,]*$/, ",") : l),
    });
    const r = ingestOk(text);
    expect(r.value.timeS.length).toBe(8000 - 100);
    expect(r.value.sections?.map((s) => s.endIndex - s.startIndex)).toEqual([4000, 3900]);
    expect(r.value.gearboxRadS.every(Number.isFinite)).toBe(true);
    const w = r.warnings.find((x) => x.code === "log_split");
    expect(w?.message).toContain("rows 4002–4101");
  });
  it("repairMaxSamples and repairMaxS set the limit (the fewer samples applies)", () => {
    const three = rippleCsv(2, {
      edit: (i, l) => (i >= 1000 && i < 1003 ? l.replace(/,[^,]*$/, ",") : l),
    });
    expect(ingestOk(three).value.sections).toBeUndefined();
    expect(ingestOk(three, { repairMaxSamples: 2 }).value.sections).toHaveLength(2);
    // 1 ms at 2 kHz is 2 samples.
    expect(ingestOk(three, { repairMaxS: 0.001 }).value.sections).toHaveLength(2);
  });
  it("a section shorter than one block is skipped with a warning", () => {
    // Gap after 0.05 s: the first section holds 2.5 revolutions, fewer than R = 8.
    const text = rippleCsv(3, { edit: (i, l) => (i >= 100 && i < 200 ? null : l) });
    const a = analyseDriveLog(ingestOk(text).value, { cylinders: 4 });
    if (!a.ok) throw new Error(a.error.message);
    expect(a.value.warnings.find((w) => w.code === "section_skipped")?.message).toContain(
      "from 0 s to 0.05 s",
    );
    expect(a.value.blocks).toBeGreaterThan(0);
  });
});

describe("strict keeps today's refusals", () => {
  const strict = { strict: true };
  const errorOf = (text: string) => {
    const r = ingestCsv(text, strict);
    return r.ok ? null : r.error;
  };
  it("missing_value, non_finite (row, column, message as before)", () => {
    const empty = rippleCsv(1, { edit: (i, l) => (i === 7 ? l.replace(/,[^,]*$/, ",") : l) });
    expect(errorOf(empty)).toEqual({
      code: "missing_value",
      message: 'row 9, column "gearbox input speed [rpm]": the gearbox speed is empty',
      row: 9,
      column: "gearbox input speed [rpm]",
    });
    const nan = rippleCsv(1, { edit: (i, l) => (i === 7 ? l.replace(/,[^,]*$/, ",NaN") : l) });
    expect(errorOf(nan)?.message).toBe(
      'row 9, column "gearbox input speed [rpm]": the gearbox speed "NaN" is not a finite number',
    );
  });
  it("time_gap and irregular_sampling (10 % tolerance) as before", () => {
    expect(errorOf(gapText)).toEqual({
      code: "time_gap",
      message: "gap in the time at row 4002: 1.9995 s to 2.05 s, the sampling interval is 0.0005 s",
      row: 4002,
      column: "time [s]",
    });
    const jittered = errorOf(rippleCsv(1, { jitter: 0.2 }));
    expect(jittered?.code).toBe("irregular_sampling");
    expect(jittered?.message).toContain("by more than 10 %");
  });
  it("a NaN handed to finishLog (an MDF4 channel) is non_finite when strict", () => {
    const log = ingestOk(rippleCsv(1)).value;
    const withNaN: DriveLog = { ...log, crankRadS: Float64Array.from(log.crankRadS) };
    withNaN.crankRadS[10] = NaN;
    const r = finishLog(withNaN, (i) => i + 1, strict);
    expect(r.ok ? null : r.error).toMatchObject({ code: "non_finite", row: 11 });
    expect(finishLog(withNaN, (i) => i + 1, {}).ok).toBe(true);
  });
});
