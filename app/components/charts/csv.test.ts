import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { buildCsv, columnsToRows, fileSlug } from "./csv";

describe("buildCsv", () => {
  it("quotes as RFC 4180 §2 says (comma, quote doubled, line break)", () => {
    const csv = buildCsv(["a", "b, c", 'say "hi"'], [["x\ny", 1, null]]);
    expect(csv).toBe('a,"b, c","say ""hi"""\r\n"x\ny",1,\r\n');
  });

  it("numbers parse back to exactly the chart data (papaparse, an independent parser)", () => {
    // Values like the chart data: three-significant-digit map cells, long binary fractions.
    const rpm = [1100, 1150, 4350.5, 0.1 + 0.2, 1 / 3, 2 ** -30, -12.345678901234567];
    const db = [15.12, 16.57, -10.89, 0, 1e-7, 123456789.125, 5e-324];
    const csv = buildCsv(["engine speed (rpm)", "isolation (dB)"], columnsToRows([rpm, db]));
    const parsed = Papa.parse<string[]>(csv.trim(), { skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    const [header, ...rows] = parsed.data;
    expect(header).toEqual(["engine speed (rpm)", "isolation (dB)"]);
    expect(rows.map((r) => Number(r[0]))).toEqual(rpm);
    expect(rows.map((r) => Number(r[1]))).toEqual(db);
  });

  it("writes gaps and non-finite values as empty fields, booleans as words", () => {
    expect(
      buildCsv(
        ["t", "v", "ok"],
        [
          [0, null, true],
          [1, Number.NaN, false],
        ],
      ),
    ).toBe("t,v,ok\r\n0,,true\r\n1,,false\r\n");
  });

  it("refuses rows of the wrong width and columns of different lengths", () => {
    expect(() => buildCsv(["a", "b"], [[1]])).toThrow(/1 fields/);
    expect(() => columnsToRows([[1, 2], [3]])).toThrow(/differ/);
  });
});

describe("fileSlug", () => {
  it("makes a plain file name of a chart title", () => {
    expect(fileSlug("Order map — crank side")).toBe("order-map-crank-side");
    expect(fileSlug("Order spectrum at 1850 rpm")).toBe("order-spectrum-at-1850-rpm");
  });
});
