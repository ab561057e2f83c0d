/**
 * The spooled ingest (ingest-samples.ts) against the batch ingest (ingestFile, ingestCsv), whose
 * own tests hold it to outside sources: papaparse + Number() for every field (ingest-fuzz.test.ts)
 * and an independent MDF4 reader's values (tests/fixtures/mdf4/README.md). For every CSV in
 * samples/, every MDF4 reference file (written by numpy from the block layout, not by this
 * project), the logs of the fuzz and repair tests (their generators reused) and longer logs
 * whose problems lie past the point where the row reader is renewed: the SampleSource read
 * back in several window sizes holds every sample of the DriveLog bit for bit, and the same
 * sampleRateHz, sections, source and warnings; a refusal has the same code, row and column.
 * Two direct checks against outside sources stand beside these: a sample CSV against papaparse
 * + Number() × 2π/60 (1 rpm = 2π/60 rad/s, the definition of the revolution), and an MDF4 file
 * against the independent reader's values in its .expected.json.
 * Temporary files go to a folder of this test's own (TMPDIR), checked empty after each case.
 */
import fc from "fast-check";
import { readdirSync, readFileSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { RIPPLE, rippleCsv } from "../../../tests/support/ripple-csv.ts";
import {
  batchOf,
  chunked,
  expectSame,
  sameOnText,
  useOwnTmpdir,
} from "../../../tests/support/sample-source-compare.ts";
import { ingestSamples } from "./ingest-samples.ts";
import { ROTATE_ROWS } from "./ingest-spool-rows.ts";
import { ingestFile } from "./ingest-stream.ts";
import type { IngestOptions } from "./ingest.ts";

const root = join(import.meta.dirname, "../../..");
const samplesDir = join(root, "samples");
const mdfDir = join(root, "tests/fixtures/mdf4");
const csvs = readdirSync(samplesDir).filter((f) => f.endsWith(".csv"));
const mdfs = readdirSync(mdfDir).filter((f) => f.endsWith(".mf4"));
const workDir = useOwnTmpdir();

// Channels named where recognition cannot tell (as mdf4/fixtures.test.ts names them).
const pick: Record<string, IngestOptions> = {
  "drive-log-chunked.mf4": { crankColumn: "n_eng", gearboxColumn: "n_gbx_in" },
  "types.mf4": { crankColumn: "f32_be", gearboxColumn: "f64" },
};
for (const base of ["drive-log-plain", "drive-log-deflate", "drive-log-transposed"])
  pick[`${base}.mf4`] = { crankColumn: "EngSpd", gearboxColumn: "gearbox/GbxInpShaftSpd" };

describe("files: the samples and the MDF4 reference files", () => {
  for (const f of csvs)
    it(`samples/${f}, read as a file`, async () => {
      const path = join(samplesDir, f);
      expectSame(await ingestSamples(path), await ingestFile(path));
    });
  for (const f of mdfs)
    it(`tests/fixtures/mdf4/${f}, read as a file and as a stream`, async () => {
      const path = join(mdfDir, f);
      const o = pick[f] ?? {};
      const batch = await ingestFile(path, o);
      expect(batch.ok).toBe(true); // a log, not only the same refusal
      expectSame(await ingestSamples(path, o), batch);
      expectSame(await ingestSamples(chunked(readFileSync(path), [65536]), o), batch);
      expectSame(
        await ingestSamples(path, { ...o, strict: true }),
        await ingestFile(path, { ...o, strict: true }),
      );
    });
  it("strict, and a missing file", async () => {
    const path = join(samplesDir, csvs[0]!);
    expectSame(
      await ingestSamples(path, { strict: true }),
      await ingestFile(path, { strict: true }),
    );
    const none = join(workDir(), "none.csv");
    expectSame(await ingestSamples(none), await ingestFile(none));
  });
});

describe("outside sources directly", () => {
  it("a sample's times and speeds are papaparse + Number() × 2π/60 (rpm → rad/s by definition)", async () => {
    const path = join(samplesDir, csvs[0]!);
    const rows = Papa.parse<string[]>(readFileSync(path, "utf8").trim(), {}).data;
    const first = rows.findIndex(
      (r) => r.length >= 3 && r.every((x) => x !== "" && Number.isFinite(Number(x))),
    );
    const data = rows.slice(first);
    const r = await ingestSamples(path);
    if (!r.ok) throw new Error(r.error.message);
    const w = r.value.read(0, r.value.length);
    r.value.close();
    expect(w.timeS.length).toBe(data.length);
    let bad = 0;
    data.forEach((row, i) => {
      const rad = (Number(row[1]) * 2 * Math.PI) / 60;
      if (Math.abs(w.crankRadS[i]! - rad) > 1e-12 * Math.abs(rad)) bad++;
      const t = Number(row[0]) / 1000; // the column is t_ms: 1 ms = 10⁻³ s
      if (Math.abs(w.timeS[i]! - t) > 1e-12 * Math.max(1, t)) bad++;
    });
    expect(bad).toBe(0);
  });
  it("an MDF4 file's samples are the independent reader's values (its .expected.json)", async () => {
    const exp = JSON.parse(
      readFileSync(join(mdfDir, "drive-log-chunked.expected.json"), "utf8"),
    ) as {
      groups: { channels: { name: string; values: number[] }[] }[];
    };
    const ch = exp.groups[0]!.channels;
    const time = ch.find((c) => c.name === "time")!.values;
    const crank = ch.find((c) => c.name === "n_eng")!.values; // rpm
    const r = await ingestSamples(
      join(mdfDir, "drive-log-chunked.mf4"),
      pick["drive-log-chunked.mf4"],
    );
    if (!r.ok) throw new Error(r.error.message);
    const w = r.value.read(0, r.value.length);
    r.value.close();
    expect(w.timeS.length).toBe(time.length);
    expect(w.timeS.every((t, i) => Math.abs(t - time[i]!) <= 1e-9 * Math.max(1, Math.abs(t)))).toBe(
      true,
    );
    const rad = (i: number) => (crank[i]! * 2 * Math.PI) / 60; // 1 rpm = 2π/60 rad/s
    expect(w.crankRadS.every((c, i) => Math.abs(c - rad(i)) <= 1e-9 * Math.max(1, rad(i)))).toBe(
      true,
    );
  });
});

// The fuzz tests' generator (ingest-fuzz.test.ts).
const HEADER = "time [s],crank speed [rpm],gearbox input speed [rpm],x1,x2";
function valid(n: number): string {
  const lines = [HEADER];
  for (let i = 0; i < n; i++)
    lines.push(
      `${(i / 1000).toFixed(3)},${(800 + 5 * Math.sin(i)).toFixed(3)},${(790 + 2 * Math.cos(i)).toFixed(3)},${i},${-i / 8}`,
    );
  return `${lines.join("\n")}\n`;
}
const VALID = new TextEncoder().encode(valid(400));

describe("the fuzz tests' inputs, in random chunks", () => {
  it("random bytes", async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.uint8Array({ maxLength: 3000 }),
        fc.integer({ min: 1, max: 400 }),
        (b, k) => sameOnText(b, {}, [k]),
      ),
      { numRuns: 100 },
    );
  });
  it("random CSV-ish text after a header", async () => {
    const ch = fc.constantFrom(...'0123456789.,;\t\n\r -+eE"abc[]()'.split(""));
    await fc.assert(
      fc.asyncProperty(fc.array(ch, { maxLength: 400 }), fc.integer({ min: 1, max: 100 }), (a, k) =>
        sameOnText(`${HEADER}\n${a.join("")}`, {}, [k]),
      ),
      { numRuns: 150 },
    );
  });
  it("truncations of a valid file, strict and not", async () => {
    await fc.assert(
      fc.asyncProperty(fc.integer({ min: 0, max: VALID.length }), fc.boolean(), (cut, strict) =>
        sameOnText(VALID.subarray(0, cut), { strict }, [97, 1, 4000]),
      ),
      { numRuns: 80 },
    );
  });
});

// The repair fuzz tests' generator (ingest-repairs-fuzz.test.ts): holes in the ripple log.
const hole = fc.record({
  at: fc.integer({ min: 0, max: 1199 }),
  length: fc.integer({ min: 1, max: 60 }),
  kind: fc.constantFrom("empty-gearbox", "nan-crank", "drop-row", "empty-time"),
});
function withHoles(
  seconds: number,
  holes: { at: number; length: number; kind: string }[],
  jitter: number,
) {
  return rippleCsv(seconds, {
    jitter,
    edit: (i, l) => {
      const h = holes.find((x) => i >= x.at && i < x.at + x.length);
      if (!h) return l;
      const f = l.split(",");
      if (h.kind === "drop-row") return null;
      if (h.kind === "empty-gearbox") f[2] = "";
      if (h.kind === "nan-crank") f[1] = "NaN";
      if (h.kind === "empty-time") f[0] = "";
      return f.join(",");
    },
  });
}

describe("the repair tests' logs", () => {
  it("random holes, with and without jitter, strict and not", async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.array(hole, { maxLength: 6 }),
        fc.constantFrom(0, 0.1, 0.4),
        fc.boolean(),
        (holes, jitter, strict) => sameOnText(withHoles(0.6, holes, jitter), { strict }, [5000]),
      ),
      { numRuns: 60 },
    );
  });
});

// Longer than one row reader holds (32768 rows): the problems lie past the renewal.
describe("logs longer than one row reader", () => {
  const seconds = 40; // 80 000 rows at RIPPLE.fs
  const at = 70000;
  const cases: [string, (i: number, l: string) => string | null, IngestOptions?][] = [
    ["clean", (_i, l) => l],
    ["blank lines and dropped rows", (i, l) => (i % 9000 === 5 ? `\n${l}` : i === at ? null : l)],
    ["an empty time (a dropped row)", (i, l) => (i === at ? l.replace(/^[^,]*/, "") : l)],
    ["a dropout filled", (i, l) => (i >= at && i < at + 3 ? l.replace(/,[^,]*$/, ",") : l)],
    [
      "a long dropout that splits",
      (i, l) => (i >= at && i < at + 300 ? l.replace(/,[^,]*$/, ",") : l),
    ],
    [
      "time repeating",
      (i, l) => (i === at ? l.replace(/^[^,]*/, ((at - 1) / RIPPLE.fs).toFixed(7)) : l),
    ],
    ["time going back", (i, l) => (i === at ? l.replace(/^[^,]*/, "0.5") : l)],
    ["a wrong field count", (i, l) => (i === at ? `${l},1` : l)],
    ["text in a speed", (i, l) => (i === at ? l.replace(/,[^,]*$/, ",abc") : l)],
    ["an implausible speed", (i, l) => (i === at ? l.replace(/,[^,]*$/, ",-500") : l)],
    ["clipping", (i, l) => (i >= at && i < at + 12 ? l.replace(/,[^,]*,/, ",9000,") : l)],
    ["a dropout, strict", (i, l) => (i === at ? l.replace(/,[^,]*$/, ",") : l), { strict: true }],
    ["a short last row", (i, l) => (i === seconds * RIPPLE.fs - 1 ? l.replace(/,[^,]*$/, "") : l)],
  ];
  for (const [name, edit, options] of cases)
    it(name, async () => {
      let text = rippleCsv(seconds, { edit });
      if (name === "a short last row") text = text.trimEnd();
      await sameOnText(text, options, [65536, 3, 100000]);
    });
  it("time going back or repeating at the first row of a renewed reader", async () => {
    // One line per chunk: a reader is renewed after the chunk that takes it past ROTATE_ROWS,
    // so data line ROTATE_ROWS + 1 is the first of the second reader (its row 1, after the
    // anchor), and 2·ROTATE_ROWS + 1 the first of the third.
    for (const [at, back] of [
      [ROTATE_ROWS + 1, true],
      [2 * ROTATE_ROWS + 1, false],
    ] as const) {
      const t = (i: number) => (i / RIPPLE.fs).toFixed(7);
      const text = rippleCsv(36, {
        edit: (i, l) => (i === at ? l.replace(/^[^,]*/, t(back ? at - 2 : at - 1)) : l),
      });
      const sizes = text.split("\n").map((l) => l.length + 1);
      const batch = await batchOf(text, {}, sizes);
      expect(batch.ok ? "" : batch.error.code).toBe("time_not_increasing");
      expectSame(await ingestSamples(chunked(text, sizes)), batch);
    }
  });
  it("a line longer than 1 MB after the renewal", async () => {
    const text = rippleCsv(20) + "1".repeat(1_200_000);
    await sameOnText(text, {}, [65536]);
  });
  it("jitter, resampled", async () => {
    await sameOnText(rippleCsv(20, { jitter: 0.1 }), {}, [65536]);
  });
  it("a file with a units row and times in ms", async () => {
    const lines = ["time,crank,gearbox", "ms,rpm,rpm"];
    for (let i = 0; i < 50000; i++)
      lines.push(`${(i * 0.5).toFixed(1)},${900 + (i % 7)},${880 + (i % 5)}`);
    const path = join(workDir(), "ms.csv");
    writeFileSync(path, `${lines.join("\r\n")}\r\n`);
    expectSame(await ingestSamples(path), await ingestFile(path));
  });
});
