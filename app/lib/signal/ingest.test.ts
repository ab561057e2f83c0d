import { describe, expect, it } from "vitest";
import { createIngester, ingestCsv } from "./ingest.ts";

// Every row and column expected below is counted from the file the test itself builds:
// rows are 1-based file lines with the header as row 1 (issue 4, point 2).
const HEADER = "time [s],crank speed [rpm],gearbox input speed [rpm]";

/** n clean data lines at 1 kHz, 800 rpm; `edit(i, line)` may replace data line i (0-based). */
function file(n: number, edit: (i: number, line: string) => string = (_, l) => l): string {
  const lines = [HEADER];
  for (let i = 0; i < n; i++)
    lines.push(edit(i, `${(i * 0.001).toFixed(3)},${800 + (i % 7)},${800 + (i % 5)}`));
  return `${lines.join("\n")}\n`;
}
const rowOfData = (i: number) => i + 2;

function errorOf(text: string | Uint8Array, options = {}) {
  const r = ingestCsv(text, options);
  if (r.ok) throw new Error("expected an error value");
  return r.error;
}

describe("bad input gives its error code, row and column", () => {
  it("empty file", () => {
    expect(errorOf("").code).toBe("empty_file");
    expect(errorOf("\n \r\n\n").code).toBe("empty_file");
  });
  it("header but no data rows", () => {
    expect(errorOf(`${HEADER}\n`)).toMatchObject({ code: "no_data_rows", row: 2 });
  });
  it("missing channel lists the columns", () => {
    const e = errorOf("time [s],crank speed [rpm],oil temp [°C]\n0,800,90\n");
    expect(e).toMatchObject({
      code: "missing_channel",
      row: 1,
      columns: ["time [s]", "crank speed [rpm]", "oil temp [°C]"],
    });
  });
  it("text in a numeric column", () => {
    const e = errorOf(file(50, (i, l) => (i === 30 ? "0.030,n/a,801" : l)));
    expect(e).toMatchObject({
      code: "not_numeric",
      row: rowOfData(30),
      column: "crank speed [rpm]",
    });
    expect(e.message).toContain('"n/a"');
  });
  // Strict keeps the refusals of empty and non-finite cells and of gaps (issue 14: repaired
  // otherwise, see ingest-repairs.test.ts).
  it("an empty required cell (strict)", () => {
    const text = file(50, (i, l) => (i === 7 ? "0.007,800," : l));
    expect(errorOf(text, { strict: true })).toMatchObject({
      code: "missing_value",
      row: 9,
      column: "gearbox input speed [rpm]",
    });
  });
  it("time going backwards names both values (the docs/conventions.md example form)", () => {
    const e = errorOf(
      file(2100, (i, l) =>
        i === 1999 ? "1.995,800,800" : l.replace(/^[^,]+/, (i * 0.001 + 0.001).toFixed(3)),
      ),
    );
    expect(e).toMatchObject({ code: "time_not_increasing", row: 2001, column: "time [s]" });
    expect(e.message).toBe("time goes backwards at row 2001 (1.995 s after 1.999 s)");
  });
  it("time repeating", () => {
    const e = errorOf(file(50, (i, l) => (i === 20 ? l.replace("0.020", "0.019") : l)));
    expect(e).toMatchObject({ code: "time_not_increasing", row: 22 });
    expect(e.message).toContain("repeats");
  });
  it("irregular sampling beyond the tolerance names the rows", () => {
    // Sample 40 comes 0.3 ms late (30 % of the 1 ms interval; default tolerance 10 %).
    const e = errorOf(file(100, (i, l) => (i === 40 ? l.replace("0.040", "0.0403") : l)));
    expect(e).toMatchObject({ code: "irregular_sampling", row: rowOfData(40), column: "time [s]" });
    expect(e.message).toContain(`rows ${rowOfData(40)}, ${rowOfData(41)}`);
    // The same file passes with a 50 % tolerance.
    expect(
      ingestCsv(
        file(100, (i, l) => (i === 40 ? l.replace("0.040", "0.0403") : l)),
        { samplingTolerance: 0.5 },
      ).ok,
    ).toBe(true);
  });
  it("a gap in the time (strict)", () => {
    const text = file(100, (i, l) =>
      i >= 60 ? l.replace(/^[^,]+/, ((i + 10) * 0.001).toFixed(3)) : l,
    );
    expect(errorOf(text, { strict: true })).toMatchObject({
      code: "time_gap",
      row: rowOfData(60),
      column: "time [s]",
    });
  });
  it.each(["NaN", "inf", "-Infinity"])("non-finite value %s (strict)", (word) => {
    const text = file(30, (i, l) => (i === 12 ? `0.012,800,${word}` : l));
    expect(errorOf(text, { strict: true })).toMatchObject({
      code: "non_finite",
      row: 14,
      column: "gearbox input speed [rpm]",
    });
  });
  it("negative speed and one above 12000 rpm are implausible", () => {
    expect(errorOf(file(30, (i, l) => (i === 5 ? "0.005,-800,800" : l)))).toMatchObject({
      code: "implausible_speed",
      row: 7,
      column: "crank speed [rpm]",
    });
    expect(errorOf(file(30, (i, l) => (i === 6 ? "0.006,800,15000" : l)))).toMatchObject({
      code: "implausible_speed",
      row: 8,
      column: "gearbox input speed [rpm]",
    });
    // 12000 rpm = 1256.6 rad/s: the limit holds in any unit.
    const radS =
      "time [s],crank [rad/s],gearbox [rad/s]\n0,100,100\n0.001,1300,100\n0.002,100,100\n";
    expect(errorOf(radS)).toMatchObject({ code: "implausible_speed", row: 3 });
  });
  it("a file that is not text: NUL bytes, binary header, UTF-16", () => {
    const text = file(20);
    const bytes = new TextEncoder().encode(text);
    const line5 = text.split("\n").slice(0, 4).join("\n").length + 1; // start of line 5
    bytes[line5 + 2] = 0; // a NUL inside line 5
    expect(errorOf(bytes)).toMatchObject({ code: "not_text", row: 5 });
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]);
    // The PNG signature (ISO/IEC 15948, §5.2): "\x89PNG\r\n" is line 1, its 0x1a starts line 2.
    expect(errorOf(png)).toMatchObject({ code: "not_text", row: 2 });
    expect(errorOf(new Uint8Array([0xff, 0xfe, 0x74, 0x00]))).toMatchObject({
      code: "not_text",
      row: 1,
    });
  });
  it("a row with the wrong number of fields", () => {
    expect(errorOf(file(30, (i, l) => (i === 9 ? "0.009,800" : l)))).toMatchObject({
      code: "wrong_field_count",
      row: 11,
    });
  });
});

describe("warnings that still allow analysis", () => {
  it("short file (< 2 s)", () => {
    const r = ingestCsv(file(100));
    expect(r.ok).toBe(true);
    expect(r.warnings.map((w) => w.code)).toContain("short_log");
  });
  it("low sampling rate for the top order: 100 Hz at 3000 rpm, order 6 needs > 600 Hz (sampling theorem)", () => {
    const lines = ["time [s],crank [rpm],gearbox [rpm]"];
    for (let i = 0; i < 500; i++) lines.push(`${(i / 100).toFixed(2)},3000,2990`);
    const r = ingestCsv(lines.join("\n"), { topOrder: 6 });
    expect(r.ok && r.warnings.find((w) => w.code === "low_sample_rate")?.message).toContain(
      "needs more than 600 Hz",
    );
    expect(ingestCsv(lines.join("\n"), { topOrder: 1 }).warnings.map((w) => w.code)).not.toContain(
      "low_sample_rate",
    );
  });
  it("clipped values: a run at the channel's maximum", () => {
    const r = ingestCsv(
      file(3000, (i, l) => (i >= 1000 && i < 1030 ? l.replace(/,[^,]+$/, ",900") : l)),
    );
    expect(r.ok).toBe(true);
    expect(r.warnings.find((w) => w.code === "clipped_values")).toMatchObject({
      row: rowOfData(1000),
      column: "gearbox input speed [rpm]",
    });
  });
  it("a truncated last line is left out with a warning, not an error", () => {
    const r = ingestCsv(`${file(30)}0.030,80`);
    expect(r.ok && r.value.timeS.length).toBe(30);
    expect(r.warnings.map((w) => w.code)).toContain("truncated_last_row");
  });
});

describe("accepted forms", () => {
  it("chunked push gives the same log as one piece, whatever the chunk size", () => {
    const text = file(500);
    const whole = ingestCsv(text);
    for (const size of [1, 7, 64, 1000]) {
      const ing = createIngester();
      for (let i = 0; i < text.length; i += size) ing.push(text.slice(i, i + size));
      const r = ing.finish();
      expect(r.ok && whole.ok && [...r.value.crankRadS]).toEqual(
        whole.ok && [...whole.value.crankRadS],
      );
    }
  });
  it("CRLF, a BOM, quoted header and fields, blank lines, extra columns", () => {
    const text =
      '\ufeff"time [s]";"Crank speed [rpm]";"input shaft speed (rpm)";gear\r\n0,000;"800,5";799,5;1\r\n\r\n0,001;801;800;N\r\n0,002;802;801;2\r\n';
    const r = ingestCsv(text);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.value.source).toMatchObject({
      delimiter: ";",
      decimal: ",",
      crankColumn: "Crank speed [rpm]",
      rows: 3,
    });
    expect(r.value.crankRadS[0]).toBeCloseTo((800.5 * 2 * Math.PI) / 60, 12);
    expect([...(r.value.extra.gear ?? [])]).toEqual([1, NaN, 2]);
  });
  it("the row after a skipped blank line keeps its file line number", () => {
    const text = file(10).replace("0.004,", "\n0.004,").replace("0.006,80", "0.006,x");
    expect(errorOf(text)).toMatchObject({ code: "not_numeric", row: rowOfData(6) + 1 });
  });
});

describe("decimal comma first seen after whole-number rows", () => {
  it("is not_numeric with a hint, and reads with the decimal option", () => {
    const text =
      "time [s];crank [rpm];gearbox [rpm]\n0;800;800\n1;800;800\n2;800;800\n3;800;800\n4;800;800\n5;800;800\n6;800,5;800\n";
    const e = errorOf(text);
    expect(e).toMatchObject({ code: "not_numeric", row: 8, column: "crank [rpm]" });
    expect(e.message).toContain("decimal");
    const r = ingestCsv(text, { decimal: "," });
    expect(r.ok && r.value.crankRadS[6]).toBeCloseTo((800.5 * 2 * Math.PI) / 60, 12);
  });
});
