import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { chooseColumns, readHeader } from "./column-choice.server";

// Issue 11 §3.1: which columns a job reads a drive log with. The header is split like the
// ingest splits it (docs/signal-ingest.md: `,` `;` or tab, a byte-order mark ignored, CRLF).

const odd =
  "\uFEFFZeit;Kanal1;Kanal2;Kanal3\r\n0,000;800,0;800,0;21,5\r\n0,001;800,1;799,9;21,5\r\n";
const standard = "time [s],crank speed [rpm],gearbox input speed [rpm]\n0.000,800,800\n";
const remembered = { timeColumn: "Zeit", crankColumn: "Kanal1", gearboxColumn: "Kanal2" };
const open = (text: string) => () => Readable.from([Buffer.from(text)]);

describe("the header of a stored drive log", () => {
  it("is split on the file's own delimiter, without the byte-order mark or the CR", async () => {
    await expect(readHeader(open(odd)())).resolves.toEqual(["Zeit", "Kanal1", "Kanal2", "Kanal3"]);
    await expect(readHeader(open(standard)())).resolves.toEqual([
      "time [s]",
      "crank speed [rpm]",
      "gearbox input speed [rpm]",
    ]);
  });
  it("is found behind a logger's preamble, the units row left aside (issue 14 §1)", async () => {
    const logger =
      "# Recorder: Kestrel DL-8\r\nRate = 5 kHz\r\n\r\nZeit;Kanal1;Kanal2;Kanal3\r\n[s];[1/min];[1/min];[-]\r\n" +
      "0,000;800,0;800,0;3\r\n0,001;800,1;799,9;3\r\n";
    await expect(readHeader(open(logger)())).resolves.toEqual([
      "Zeit",
      "Kanal1",
      "Kanal2",
      "Kanal3",
    ]);
    await expect(chooseColumns({}, remembered, open(logger))).resolves.toEqual({
      source: "remembered",
      mapping: remembered,
    });
    // A remembered unit only fills in a unit the file does not give: here its units row does.
    const stated = "Rate = 5 kHz\ntime,crank,gearbox\ns,rpm,rpm\n0,800,800\n0.001,801,799\n";
    const radS = { crankUnit: "rad/s", gearboxUnit: "rad/s" } as const;
    await expect(chooseColumns({}, radS, open(stated))).resolves.toEqual({
      source: "header",
      mapping: {},
      skipped: radS,
    });
  });
  it("is null for a file without a text line", async () => {
    await expect(readHeader(open("\n  \n")())).resolves.toBeNull();
  });
});

describe("the columns of one run", () => {
  it("columns chosen for the drive log win, without reading the file", async () => {
    const never = () => {
      throw new Error("the file must not be read");
    };
    await expect(chooseColumns({ crankColumn: "x" }, remembered, never)).resolves.toEqual({
      source: "chosen",
      mapping: { crankColumn: "x" },
    });
  });
  it("the remembered choice applies to a file that has its columns", async () => {
    await expect(chooseColumns({}, remembered, open(odd))).resolves.toEqual({
      source: "remembered",
      mapping: remembered,
    });
  });
  it("a file without them is recognised from its header, and the left-out choice is noted", async () => {
    await expect(chooseColumns({}, remembered, open(standard))).resolves.toEqual({
      source: "header",
      mapping: {},
      skipped: remembered,
    });
  });
  it("without a remembered choice the header decides", async () => {
    await expect(chooseColumns({}, null, open(odd))).resolves.toEqual({
      source: "header",
      mapping: {},
    });
  });
});

describe("a file that cannot be read", () => {
  it("leaves the remembered choice out (the worker then reports the file's own problem)", async () => {
    const missing = () => {
      throw new Error("ENOENT");
    };
    await expect(chooseColumns({}, remembered, missing)).resolves.toEqual({
      source: "header",
      mapping: {},
    });
  });
});
