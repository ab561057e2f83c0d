import { describe, expect, it } from "vitest";
import { ingestCsv, type IngestOptions } from "./ingest.ts";
import { preambleEntry } from "./ingest-preamble.ts";
import type { DriveLog } from "./types.ts";

// Logger CSV exports (issue 14 §1): a preamble of key/value and comment lines before the header,
// a units row under it. The data are an analytic ramp written by the test: time i/FS s, crank
// 1500 + i/10 rpm, gearbox 1400 + i/10 rpm (i = 0…N−1), so every read value can be checked
// against the formula; 1 rpm = 2π/60 rad/s (SI Brochure, 9th ed., table 4).
const FS = 1000;
const N = 3000; // 3 s: long enough for the whole-log checks (short_log is under 2 s)
const RPM = (2 * Math.PI) / 60;

function dataRows(d = ",", decimal = ".", cols = 3): string[] {
  const rows: string[] = [];
  for (let i = 0; i < N; i++) {
    const cells = [(i / FS).toFixed(3), (1500 + i / 10).toFixed(1), (1400 + i / 10).toFixed(1)];
    if (cols === 4) cells.push("3");
    rows.push(cells.map((c) => (decimal === "," ? c.replace(".", ",") : c)).join(d));
  }
  return rows;
}
const file = (...parts: (string | string[])[]) => `${parts.flat().join("\n")}\n`;
const HEADER = "time [s],crank speed [rpm],gearbox input speed [rpm]";

function ok(text: string, options: IngestOptions = {}): { log: DriveLog; codes: string[] } {
  const r = ingestCsv(text, options);
  if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message} (row ${r.error.row})`);
  return { log: r.value, codes: r.warnings.map((w) => w.code) };
}

/** The ramp as read: rows, the first and last values against the formula. */
function expectRamp(log: DriveLog): void {
  expect(log.source.rows).toBe(N);
  expect(log.timeS[0]).toBe(0);
  expect(log.timeS[N - 1]).toBeCloseTo((N - 1) / FS, 12);
  expect(log.crankRadS[0]).toBeCloseTo(1500 * RPM, 10);
  expect(log.crankRadS[N - 1]).toBeCloseTo((1500 + (N - 1) / 10) * RPM, 10);
  expect(log.gearboxRadS[N - 1]).toBeCloseTo((1400 + (N - 1) / 10) * RPM, 10);
}

describe("a preamble before the header", () => {
  it.each([
    ["key;value", ["Recorder;Kestrel DL-8", "Vehicle;K7"], "Recorder", "Kestrel DL-8"],
    ["key,value", ["Recorder,Kestrel DL-8", "Vehicle,K7"], "Recorder", "Kestrel DL-8"],
    ["key: value", ["Recorder: Kestrel DL-8", "Vehicle: K7"], "Recorder", "Kestrel DL-8"],
    ["key=value", ["Recorder=Kestrel DL-8", "Vehicle = K7"], "Recorder", "Kestrel DL-8"],
    ["key<tab>value", ["Recorder\tKestrel DL-8", "Vehicle\tK7"], "Recorder", "Kestrel DL-8"],
    ["# comments", ["# Recorder: Kestrel DL-8", "# Vehicle: K7"], "Recorder", "Kestrel DL-8"],
    ["// comments", ["// Recorder: Kestrel DL-8", "//Vehicle: K7"], "Recorder", "Kestrel DL-8"],
    ["% comments", ["% Recorder: Kestrel DL-8", "%Vehicle: K7"], "Recorder", "Kestrel DL-8"],
  ])("%s: read, kept in order as metadata", (_, pre, key, value) => {
    const { log } = ok(file(pre, "", HEADER, dataRows()));
    expectRamp(log);
    expect(log.source.metadata).toEqual([
      { key, value },
      { key: "Vehicle", value: "K7" },
    ]);
  });

  it("dozens of lines, blank lines and free comments: metadata in file order", () => {
    const pre = ["# Kestrel programme export", "", "Run;3", "Operator;T. Ward"];
    for (let k = 0; k < 60; k++) pre.push(`Channel ${k};unused`);
    pre.push("", "   ", "#");
    const { log } = ok(file(pre, HEADER, dataRows()));
    expectRamp(log);
    const meta = log.source.metadata ?? [];
    expect(meta.slice(0, 3)).toEqual([
      { key: "comment", value: "Kestrel programme export" },
      { key: "Run", value: "3" },
      { key: "Operator", value: "T. Ward" },
    ]);
    expect(meta).toHaveLength(63); // blank lines and the bare "#" leave no entry
    expect(meta[62]).toEqual({ key: "Channel 59", value: "unused" });
  });

  it("trailing delimiters and quotes are dropped from an entry", () => {
    expect(preambleEntry('"Rate";"5000";;;')).toEqual({ key: "Rate", value: "5000" });
    expect(preambleEntry("Start time: 12:30:05")).toEqual({ key: "Start time", value: "12:30:05" });
    expect(preambleEntry("#")).toBeUndefined();
    expect(preambleEntry("Kestrel run without a key")).toEqual({
      key: "comment",
      value: "Kestrel run without a key",
    });
  });

  it("row numbers stay file lines: an error after a 5-line preamble names its file line", () => {
    const rows = dataRows();
    rows[9] = "0.009,abc,1400.9"; // data row 10
    const r = ingestCsv(file(["# a", "b=1", "", "c: 2", "d;3"], HEADER, rows));
    // Preamble lines 1–5, header line 6, data row 10 is file line 16.
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatchObject({ code: "not_numeric", row: 16 });
  });

  it("a file of only comments has no header row", () => {
    const r = ingestCsv("# nothing\n# here\n");
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.code).toBe("no_header_row");
  });

  it("found in chunks as in one piece, whatever the chunk size", async () => {
    const { createIngester } = await import("./ingest.ts");
    const text = file(
      ["# Recorder: K", "Rate = 1 kHz", ""],
      "t;n1;n2",
      "[s];[rpm];[rpm]",
      dataRows(";"),
    );
    const names = { crankColumn: "n1", gearboxColumn: "n2" };
    const whole = ok(text, names).log;
    expectRamp(whole);
    for (const size of [1, 7, 64, 4096]) {
      const ing = createIngester(names);
      for (let i = 0; i < text.length; i += size) ing.push(text.slice(i, i + size));
      const got = ing.finish();
      if (!got.ok) throw new Error(got.error.message);
      expect(got.value.crankRadS).toEqual(whole.crankRadS);
      expect(got.value.timeS).toEqual(whole.timeS);
      expect(got.value.source.metadata).toEqual([
        { key: "Recorder", value: "K" },
        { key: "Rate", value: "1 kHz" },
      ]);
    }
  });
});

describe("the header row the user picks (headerRow, 1-based file line)", () => {
  it("wins over the detection, and the lines before it are metadata", () => {
    // Line 2 is a row of names followed by data-looking rows of the same width: the detection
    // would take it; the user says line 4.
    const text = file(["Block;A;B", "x;1;2", "", HEADER.replaceAll(",", ";")], dataRows(";"));
    const { log } = ok(text, { headerRow: 4 });
    expectRamp(log);
    expect(log.source.metadata).toEqual([
      { key: "Block", value: "A;B" },
      { key: "x", value: "1;2" },
    ]);
  });
  it("a blank or missing row is a clear error", () => {
    for (const headerRow of [2, 99999]) {
      const r = ingestCsv(file(HEADER, "", dataRows()), { headerRow });
      expect(r.ok).toBe(false);
      if (!r.ok) expect(r.error.code).toBe("header_row_not_found");
    }
  });
});

describe("a units row under the header", () => {
  it.each([
    ["[s];[1/min];[U/min]", ";"],
    ["s,rpm,rpm", ","],
    ["(s),(1/min),(1/min)", ","],
    ["[s]\t[rpm]\t[rpm]", "\t"],
  ])("%s gives the units and is not a data row", (units, d) => {
    const { log, codes } = ok(file(`time${d}crank${d}gearbox`, units, dataRows(d)));
    expectRamp(log);
    expect(log.source).toMatchObject({ timeUnit: "s", crankUnit: "rpm", gearboxUnit: "rpm" });
    expect(codes).not.toContain("unit_assumed");
  });

  it("deg/s in the units row converts (1 deg/s = π/180 rad/s, SI Brochure table 4), empty and [-] cells are no unit", () => {
    const rows = dataRows(";", ".", 4);
    const { log, codes } = ok(file("time;crank;gearbox;gear", "[s];[deg/s];;[-]", rows));
    expect(log.source.crankUnit).toBe("deg/s");
    expect(log.crankRadS[0]).toBeCloseTo((1500 * Math.PI) / 180, 10);
    // The gearbox cell is empty: read as rpm with the usual warning.
    expect(log.source.gearboxUnit).toBe("rpm");
    expect(codes).toContain("unit_assumed");
  });

  it("the caller's units override the units row", () => {
    const { log } = ok(file("time,crank,gearbox", "ms,rad/s,rad/s", dataRows()), {
      timeUnit: "s",
      unit: "rpm",
    });
    expectRamp(log);
  });

  it("an error after a units row names its file line", () => {
    const rows = dataRows(";");
    rows[0] = "0.000;1500.0;"; // empty gearbox cell in data row 1 = file line 3
    const r = ingestCsv(file("time;crank;gearbox", "[s];[rpm];[rpm]", rows), { strict: true });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.row).toBe(3);
  });
});
