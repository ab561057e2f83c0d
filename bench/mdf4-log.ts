/**
 * The bench's drive log (drive-log.ts, same samples) as an MDF4 file, the way a logger writes
 * one: a sorted data group, records of time (float64 master), crank and gearbox-input speed
 * (float32, rpm) and two channels the analysis does not pick (a uint16 pedal position with a
 * linear conversion, a uint8 temperature), in a data list of 4 MiB DT blocks whose seams cut
 * through records. Bench support only, not test truth.
 *
 * `tsx bench/mdf4-log.ts OUT.mf4 [durationS] [sampleRateHz]` (run in a child process, so the
 * writer's memory does not count in the analysis' peak RSS).
 */
import { writeFileSync } from "node:fs";
import { MdfBuilder } from "../tests/support/mdf4-builder.ts";
import { benchSamples, type BenchLogOptions } from "./drive-log.ts";

const RECORD = 19;
const BLOCK = 4 << 20;

export function writeBenchMdf4(path: string, o: BenchLogOptions): { bytes: number; rows: number } {
  const rows = Math.round(o.durationS * o.sampleRateHz);
  const data = Buffer.alloc(rows * RECORD);
  let i = 0;
  for (const [t, crank, gear] of benchSamples(o)) {
    const at = i * RECORD;
    data.writeDoubleLE(t, at);
    data.writeFloatLE(crank, at + 8);
    data.writeFloatLE(gear, at + 12);
    data.writeUInt16LE(Math.round((50 + 40 * Math.sin(t / 7)) / 0.4), at + 16);
    data.writeUInt8(90, at + 18);
    i++;
  }
  const b = new MdfBuilder();
  const temp = b.cn({
    name: "oil temperature",
    unit: "degC",
    dataType: 0,
    byteOffset: 18,
    bitCount: 8,
  });
  const pedal = b.cn({
    next: temp,
    name: "pedal",
    cc: b.cc(1, [0, 0.4], "%"),
    dataType: 0,
    byteOffset: 16,
    bitCount: 16,
  });
  const gear = b.cn({
    next: pedal,
    name: "gearbox input speed",
    unit: "rpm",
    dataType: 4,
    byteOffset: 12,
    bitCount: 32,
  });
  const crank = b.cn({
    next: gear,
    name: "crank speed",
    unit: "rpm",
    dataType: 4,
    byteOffset: 8,
    bitCount: 32,
  });
  const time = b.timeMaster(crank, "time");
  const blocks: number[] = [];
  for (let at = 0; at < data.length; at += BLOCK) blocks.push(b.dt(data.subarray(at, at + BLOCK)));
  const cg = b.cg({ cnFirst: time, name: "Kestrel logger", cycles: rows, dataBytes: RECORD });
  b.setHd(0, b.dg(cg, b.dl(blocks)));
  const bytes = b.bytes();
  writeFileSync(path, bytes);
  return { bytes: bytes.length, rows };
}

if (process.argv[1] && import.meta.url === new URL(`file://${process.argv[1]}`).href) {
  const [out, dur, rate] = process.argv.slice(2);
  if (!out) throw new Error("usage: tsx bench/mdf4-log.ts OUT.mf4 [durationS] [sampleRateHz]");
  const r = writeBenchMdf4(out, {
    durationS: Number(dur ?? 600),
    sampleRateHz: Number(rate ?? 5000),
    order: 2,
  });
  process.stdout.write(`${JSON.stringify(r)}\n`);
}
