/**
 * The spooled ingest of MDF4 record piece by record piece (mdf4/samples.ts) against the batch
 * ingest (ingestFile), whose MDF4 reader is held to an independent reader's values
 * (tests/fixtures/mdf4/README.md; the reference files themselves are compared in
 * ingest-samples.test.ts). Logs of one time base written with the test MDF4 writer
 * (tests/support/mdf4-builder.ts, the layout of ASAM MDF 4.2), clean, refused and repaired,
 * strict and not: the SampleSource equals the DriveLog bit for bit, with the same warnings and
 * refusals (tests/support/sample-source-compare.ts).
 */
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { MdfBuilder } from "../../../tests/support/mdf4-builder.ts";
import { RIPPLE } from "../../../tests/support/ripple-csv.ts";
import { expectSame, useOwnTmpdir } from "../../../tests/support/sample-source-compare.ts";
import { ingestSamples } from "./ingest-samples.ts";
import { ingestFile } from "./ingest-stream.ts";

const workDir = useOwnTmpdir();

/**
 * A one-group MDF4 log as a logger writes one (the layout of bench/mdf4-log.ts): float64 time,
 * float32 crank and gearbox speeds in `unit`, an invalidation byte; records in DT blocks of
 * 64 KiB whose seams cut through records, so the reader hands them on in many pieces. `edit`
 * may change record i's values or mark a speed invalid.
 */
type Rec = { t: number; c: number; g: number; invalid?: boolean };
function mdfLog(
  name: string,
  rows: number,
  edit: (i: number, v: { t: number; c: number; g: number; invalid?: boolean }) => void = () => {},
  unit = "rpm",
): string {
  const REC = 17;
  const data = Buffer.alloc(rows * REC);
  const w = (2 * Math.PI * RIPPLE.rpm) / 60;
  for (let i = 0; i < rows; i++) {
    const t = i / RIPPLE.fs;
    const r = Math.cos(RIPPLE.order * w * t);
    const v: Rec = {
      t,
      c: RIPPLE.rpm + RIPPLE.crankAmpRpm * r,
      g: RIPPLE.rpm + RIPPLE.gearboxAmpRpm * r,
    };
    edit(i, v);
    data.writeDoubleLE(v.t, i * REC);
    data.writeFloatLE(v.c, i * REC + 8);
    data.writeFloatLE(v.g, i * REC + 12);
    data.writeUInt8(v.invalid ? 1 : 0, i * REC + 16);
  }
  const b = new MdfBuilder();
  const gear = b.cn({
    name: "gearbox input speed",
    unit,
    dataType: 4,
    byteOffset: 12,
    bitCount: 32,
    flags: 2,
    invalBitPos: 0,
  });
  const crank = b.cn({
    next: gear,
    name: "crank speed",
    unit,
    dataType: 4,
    byteOffset: 8,
    bitCount: 32,
  });
  const time = b.timeMaster(crank, "time");
  const blocks: number[] = [];
  for (let at = 0; at < data.length; at += 65536) blocks.push(b.dt(data.subarray(at, at + 65536)));
  const cg = b.cg({
    cnFirst: time,
    name: "Kestrel logger",
    cycles: rows,
    dataBytes: 16,
    invalBytes: 1,
  });
  b.setHd(0, b.dg(cg, b.dl(blocks)));
  const path = join(workDir(), name);
  writeFileSync(path, b.bytes());
  return path;
}

describe("MDF4 read piece by piece (one time base)", () => {
  const rows = 40000; // 680 KB of records: 11 blocks, many pieces
  const at = 30001;
  const cases: [
    string,
    (i: number, v: { t: number; c: number; g: number; invalid?: boolean }) => void,
    string?,
  ][] = [
    ["clean", () => {}],
    ["clean, in rad/s", () => {}, "rad/s"],
    ["time repeating", (i, v) => void (i === at && (v.t = (at - 1) / RIPPLE.fs))],
    ["time going back", (i, v) => void (i === at && (v.t = 0.25))],
    ["time repeating at the first record after the first", (i, v) => void (i === 1 && (v.t = 0))],
    ["an implausible crank speed", (i, v) => void (i === at && (v.c = 20000))],
    [
      "an implausible gearbox speed before a crank one",
      (i, v) => void ((i === at && (v.g = -300)) || (i === at + 5 && (v.c = -300))),
    ],
    [
      "an invalid gearbox value (a dropout, filled)",
      (i, v) => void (i === at && (v.invalid = true)),
    ],
    ["jitter", (i, v) => void (v.t += ((i * 7919) % 13) * 1e-6)],
    ["clipping", (i, v) => void (i >= at && i < at + 12 && (v.c = 3500))],
  ];
  for (const [name, edit, unit] of cases)
    it(name, async () => {
      const path = mdfLog(`piece-${name.replace(/\W+/g, "-")}.mf4`, rows, edit, unit);
      for (const strict of [false, true]) {
        const batch = await ingestFile(path, { strict });
        expectSame(await ingestSamples(path, { strict }), batch);
      }
    });
  it("the clean log is a log, and refusals name their record", async () => {
    const ok = await ingestFile(mdfLog("ok.mf4", rows));
    expect(ok.ok).toBe(true);
    const back = await ingestSamples(
      mdfLog("back.mf4", rows, (i, v) => void (i === at && (v.t = 0.25))),
    );
    expect(back.ok ? undefined : back.error).toMatchObject({
      code: "time_not_increasing",
      row: at + 1,
    });
  });
});
