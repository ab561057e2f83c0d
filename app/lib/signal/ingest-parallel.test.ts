import { readdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { cliTempDir } from "../../../tests/support/cli-process.ts";
import { blockHelperJobs, startBlockHelper, stopBlockHelper } from "./block-helper.ts";
import { ingestCsv } from "./ingest.ts";
import { ingestInTwo } from "./ingest-parallel.ts";
import { ingestFile } from "./ingest-stream.ts";
import type { DriveLog, Outcome } from "./types.ts";

// The two-thread ingest (ingest-parallel.ts; its second thread is the CLI's helper,
// block-helper.ts) against the one-thread ingest of the same file: the same samples, channels,
// warnings and messages. The one-thread ingest is itself held
// against papaparse + Number() (ingest-fuzz.test.ts); here it is the reference.
const samples = fileURLToPath(new URL("../../../samples", import.meta.url));
const dir = cliTempDir("twistlog-parallel-");
// Worker threads on a shared machine: a generous timeout, not a speed check.
const SLOW = { timeout: 120_000 };

/** Every array and field of two outcomes, compared value for value. */
function expectSame(two: Outcome<DriveLog> | undefined, one: Outcome<DriveLog>) {
  expect(two).toBeDefined();
  if (!two) return;
  expect(two.ok).toBe(one.ok);
  expect(two.warnings).toEqual(one.warnings);
  if (!two.ok || !one.ok) return expect(two).toEqual(one);
  const [a, b] = [two.value, one.value];
  expect(a.timeS.length).toBe(b.timeS.length);
  expect(Array.from(a.timeS)).toEqual(Array.from(b.timeS));
  expect(Array.from(a.crankRadS)).toEqual(Array.from(b.crankRadS));
  expect(Array.from(a.gearboxRadS)).toEqual(Array.from(b.gearboxRadS));
  expect(Object.keys(a.extra)).toEqual(Object.keys(b.extra));
  for (const k of Object.keys(b.extra))
    expect(Array.from(a.extra[k] ?? [])).toEqual(Array.from(b.extra[k] ?? []));
  expect(a.sampleRateHz).toBe(b.sampleRateHz);
  expect(a.sections).toEqual(b.sections);
  expect(a.source).toEqual(b.source);
}

describe("the CSV ingest on two threads", SLOW, () => {
  beforeAll(startBlockHelper);
  afterAll(stopBlockHelper);

  const csvs = readdirSync(samples).filter((f) => f.endsWith(".csv"));
  it.each(csvs)("equals the one-thread ingest on samples/%s", async (name) => {
    const path = join(samples, name);
    // minBytes 0: these ~1 MB logs are split too (the command splits from 4 MB on).
    expectSame(await ingestInTwo(path, {}, undefined, 0), await ingestFile(path));
  });

  /** A 2 kHz log of `rows` rows, CRLF line ends, one extra column. */
  function log(rows: number, edit?: (lines: string[]) => void): string {
    const lines = ["time [s],crank speed [rpm],gearbox input speed [rpm],pedal [%]"];
    for (let i = 0; i < rows; i++)
      lines.push(
        `${(i / 2000).toFixed(4)},${(1500 + 9 * Math.sin(i / 3)).toFixed(3)},${(1500 + 3 * Math.sin(i / 3 - 0.4)).toFixed(3)},${i % 100}`,
      );
    edit?.(lines);
    return `${lines.join("\r\n")}\r\n`;
  }
  const write = (name: string, text: string) => {
    const path = join(dir, name);
    writeFileSync(path, text);
    return path;
  };

  it("with blank lines, exponents and a repaired dropout on both sides of the seam", async () => {
    const path = write(
      "blanks.csv",
      log(40000, (l) => {
        for (const at of [10, 19999, 20000, 20001, 30000]) l[at] = "";
        l[25000] = l[25000]!.replace(/,[^,]*,/, ",,"); // crank dropout: filled, with a warning
        l[5000] = "2.4995e0,1.5e3,1500,7"; // exponents, read in place
      }),
    );
    const two = await ingestInTwo(path, {}, undefined, 0);
    expectSame(two, await ingestFile(path));
    expect(two?.ok && two.warnings.length).toBeGreaterThan(0);
  });

  it("gives way to the one-thread ingest on a bad row in the second half (its message)", async () => {
    const path = write(
      "bad.csv",
      log(40000, (l) => {
        l[30000] = l[30000]!.replace(/,[^,]*,/, ",abc,");
      }),
    );
    expect(await ingestInTwo(path, {}, undefined, 0)).toBeUndefined();
    const one = await ingestFile(path);
    expect(!one.ok && one.error.code).toBe("not_numeric");
    expect(!one.ok && one.error.row).toBe(30001); // file line: header + 30000 rows
  });

  it("gives way when time steps back across the seam", async () => {
    const path = write(
      "back.csv",
      log(40000, (l) => {
        for (let i = 19000; i < 21000; i++) l[i] = l[i]!.replace(/^[^,]*/, "0.0001");
      }),
    );
    expect(await ingestInTwo(path, {}, undefined, 0)).toBeUndefined();
  });

  it("is not taken without the helper thread (the one-thread ingest reads the file)", async () => {
    const path = write("alone.csv", log(30000));
    await stopBlockHelper();
    const before = blockHelperJobs();
    expect(await ingestInTwo(path, {}, undefined, 0)).toBeUndefined();
    startBlockHelper();
    expect(await ingestInTwo(path, {}, undefined, 0)).toBeDefined();
    expect(blockHelperJobs()).toBe(before + 1);
  });

  it("reads the same as ingestCsv of the text held in memory", async () => {
    const text = log(30000);
    const path = write("plain.csv", text);
    expectSame(await ingestInTwo(path, {}, undefined, 0), ingestCsv(text, {}));
  });
});
