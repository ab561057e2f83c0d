/**
 * Value layouts and conversions on small files built block by block (tests/support/mdf4-builder.ts).
 * Expected values are worked out by hand from the definitions (sources beside each): bit fields
 * as ASAM MDF 4.2 (ASAM e.V.) lays them out — the bytes from the byte offset read in the
 * channel's byte order, shifted right by the bit offset, masked to the bit count (from memory
 * of the standard); two's complement for signed; IEEE 754-2008 binary16/32; the conversion
 * formulas of the standard's CC block (from memory).
 */
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { MdfBuilder } from "../../../../tests/support/mdf4-builder.ts";
import { MdfFile } from "./file.ts";
import { ingestMdf4File, listMdf4Channels } from "./index.ts";
import { readRecords } from "./records.ts";
import { readStructure } from "./structure.ts";

const dir = mkdtempSync(join(tmpdir(), "twistlog-test-layout-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function save(name: string, b: MdfBuilder): string {
  const path = join(dir, name);
  writeFileSync(path, b.bytes());
  return path;
}

/** Every channel's decoded values by name. */
async function values(path: string): Promise<Record<string, number[]>> {
  const file = await MdfFile.open(path);
  try {
    const model = await readStructure(file);
    const out: Record<string, number[]> = {};
    for (const dg of model.dataGroups) {
      const wants = dg.groups.flatMap((g) =>
        g.channels.map((c) => {
          const v: number[] = (out[`${g.name}/${c.name}`] = []);
          return {
            group: g,
            channel: c,
            sink: (x: Float64Array, n: number) => void v.push(...x.subarray(0, n)),
          };
        }),
      );
      await readRecords(file, dg, wants);
    }
    return out;
  } finally {
    await file.close();
  }
}

const REC = 32; // 31 data bytes + 1 invalidation byte
function record(bytes: [number, number[]][]): Buffer {
  const r = Buffer.alloc(REC);
  for (const [at, b] of bytes) r.set(b, at);
  return r;
}

describe("MDF4 value layouts and conversions", () => {
  const b = new MdfBuilder();
  const u8 = (name: string, cc: number, next: number, extra = {}) =>
    b.cn({ next, name, dataType: 0, byteOffset: 21, bitCount: 8, cc, ...extra });
  let next = 0;
  next = u8("text", b.cc(7, []), next); // value → text: the raw value is kept
  next = u8("range", b.cc(6, [1, 4, 1, 5, 9, 2, 10, 100, 3, -1]), next);
  next = u8("step", b.cc(5, [0, 10, 8, 30, 100, 50]), next);
  next = u8("interp", b.cc(4, [0, 10, 10, 30, 100, 50]), next);
  next = u8("rational", b.cc(2, [0, 2, 1, 0, 0, 4]), next);
  next = u8("linear", b.cc(1, [-40, 0.5], "degC"), next);
  next = u8("invalid", 0, next, { flags: 2, invalBitPos: 3 });
  next = b.cn({ next, name: "flag", dataType: 0, byteOffset: 21, bitOffset: 7, bitCount: 1 });
  next = b.cn({ next, name: "i64", dataType: 2, byteOffset: 23, bitCount: 64 });
  next = b.cn({ next, name: "f32be", dataType: 5, byteOffset: 17, bitCount: 32 });
  next = b.cn({ next, name: "half", dataType: 4, byteOffset: 15, bitCount: 16 });
  next = b.cn({ next, name: "i24", dataType: 2, byteOffset: 12, bitCount: 24 });
  next = b.cn({ next, name: "u12be", dataType: 1, byteOffset: 10, bitOffset: 4, bitCount: 12 });
  next = b.cn({ next, name: "i12", dataType: 2, byteOffset: 8, bitOffset: 4, bitCount: 12 });
  next = b.cn({ next, name: "u12", dataType: 0, byteOffset: 8, bitOffset: 4, bitCount: 12 });
  next = b.timeMaster(next);
  const f64 = (x: number) => [...Buffer.from(new Float64Array([x]).buffer)];
  const i64 = (x: bigint) => {
    const z = Buffer.alloc(8);
    z.writeBigInt64LE(x);
    return [...z];
  };
  const data = Buffer.concat([
    record([
      [0, f64(0)],
      [8, [0xab, 0xcd]],
      [10, [0xab, 0xcd]],
      [12, [0xff, 0xff, 0xff]],
      [15, [0x00, 0x3c]],
      [17, [0x3f, 0xc0, 0, 0]],
      [21, [0]],
      [23, i64(-2n)],
      [31, [0]],
    ]),
    record([
      [0, f64(0.5)],
      [8, [0x0f, 0x80]],
      [10, [0x80, 0x0f]],
      [12, [0, 0, 0x80]],
      [15, [0x00, 0xc0]],
      [17, [0xbe, 0x80, 0, 0]],
      [21, [5]],
      [23, i64(2n ** 40n + 7n)],
      [31, [0x08]],
    ]),
    record([
      [0, f64(1)],
      [8, [0xf0, 0x7f]],
      [10, [0x7f, 0xf0]],
      [12, [1, 2, 3]],
      [15, [0xff, 0x7b]],
      [17, [0x42, 0xc8, 0, 0]],
      [21, [200]],
      [23, i64(123n)],
      [31, [0]],
    ]),
  ]);
  // Records split across blocks (a DT, then a DZ) behind a header list: a record spans the seam.
  const dl = b.dl([b.dt(data.subarray(0, 40)), b.dz(data.subarray(40))]);
  const cg = b.cg({ cnFirst: next, name: "Bits", cycles: 3, dataBytes: 31, invalBytes: 1 });
  b.setHd(0, b.dg(cg, b.hl(dl)));
  const path = save("layout.mf4", b);

  it("integers of any width and bit offset, both byte orders, signed and unsigned", async () => {
    const v = await values(path);
    // bytes AB CD read little endian = 0xCDAB; >> 4 = 0xCDA; 12 bits: 3290, signed 3290 − 4096.
    expect(v["Bits/u12"]).toEqual([0xcda, 0x800, 0x7ff]);
    expect(v["Bits/i12"]).toEqual([0xcda - 4096, 0x800 - 4096, 0x7ff]);
    // bytes AB CD read big endian = 0xABCD; >> 4 = 0xABC.
    expect(v["Bits/u12be"]).toEqual([0xabc, 0x800, 0x7ff]);
    // 24-bit two's complement: FF FF FF = −1, 00 00 80 = −2^23, 01 02 03 = 0x030201.
    expect(v["Bits/i24"]).toEqual([-1, -(2 ** 23), 0x030201]);
    expect(v["Bits/i64"]).toEqual([-2, 2 ** 40 + 7, 123]);
    // Bit 7 of the byte 0, 5, 200 (0xC8).
    expect(v["Bits/flag"]).toEqual([0, 0, 1]);
  });

  it("IEEE 754 floats: binary16 little endian, binary32 big endian", async () => {
    const v = await values(path);
    // binary16: 0x3C00 = 1, 0xC000 = −2, 0x7BFF = 65504 (the largest finite half).
    expect(v["Bits/half"]).toEqual([1, -2, 65504]);
    // binary32: 0x3FC00000 = 1.5, 0xBE800000 = −0.25, 0x42C80000 = 100.
    expect(v["Bits/f32be"]).toEqual([1.5, -0.25, 100]);
  });

  it("conversions: linear, rational, value tables, ranges; text conversions keep the raw value", async () => {
    const v = await values(path);
    // raw 0, 5, 200. Linear y = 0.5·x − 40.
    expect(v["Bits/linear"]).toEqual([-40, -37.5, 60]);
    // Rational (P1x² + P2x + P3)/(P4x² + P5x + P6) with P = 0, 2, 1, 0, 0, 4: (2x + 1)/4.
    expect(v["Bits/rational"]).toEqual([0.25, 2.75, 100.25]);
    // Keys 0, 10, 100 → 10, 30, 50: x = 5 halfway on the line 10→30; beyond the last key, 50.
    expect(v["Bits/interp"]).toEqual([10, 20, 50]);
    // Keys 0, 8, 100 → 10, 30, 50 without interpolation: 5 is nearer 8 than 0.
    expect(v["Bits/step"]).toEqual([10, 30, 50]);
    // Ranges [1,4]→1, [5,9]→2, [10,100]→3, else −1.
    expect(v["Bits/range"]).toEqual([-1, 2, -1]);
    expect(v["Bits/text"]).toEqual([0, 5, 200]);
    // Invalidation bit 3 set in record 2 only.
    expect(v["Bits/invalid"]).toEqual([0, NaN, 200]);
  });

  it("the channel list takes a channel's unit from its conversion when the channel has none", async () => {
    const list = await listMdf4Channels(path);
    expect(list.ok && list.value.find((c) => c.name === "linear")?.unit).toBe("degC");
    expect(list.ok && list.warnings.map((w) => w.code)).toEqual(["mdf4_skipped"]);
  });
});

describe("MDF4 unsorted groups and virtual masters", () => {
  it("2-byte record ids interleave two groups; a variable-length group's records are passed over", async () => {
    const b = new MdfBuilder();
    const cA = b.cn({ name: "n_a", dataType: 0, byteOffset: 8, bitCount: 16 });
    const tA = b.timeMaster(cA);
    const cC = b.cn({ name: "x_c", dataType: 4, byteOffset: 8, bitCount: 32 });
    const tC = b.timeMaster(cC);
    const gC = b.cg({ cnFirst: tC, name: "C", recordId: 3, cycles: 2, dataBytes: 12 });
    const gB = b.cg({
      cnFirst: 0,
      name: "B",
      recordId: 2,
      cycles: 2,
      dataBytes: 0,
      flags: 1,
      next: gC,
    });
    const gA = b.cg({ cnFirst: tA, name: "A", recordId: 1, cycles: 2, dataBytes: 10, next: gB });
    const rec = (id: number, body: Buffer) => Buffer.concat([Buffer.from([id, 0]), body]);
    const f64 = (x: number) => Buffer.from(new Float64Array([x]).buffer);
    const u16 = (x: number) => Buffer.from(new Uint16Array([x]).buffer);
    const f32 = (x: number) => Buffer.from(new Float32Array([x]).buffer);
    const vlsd = (s: string) =>
      Buffer.concat([Buffer.from(new Uint32Array([s.length]).buffer), Buffer.from(s)]);
    const data = Buffer.concat([
      rec(1, Buffer.concat([f64(0), u16(100)])),
      rec(2, vlsd("hello")),
      rec(3, Buffer.concat([f64(0), f32(1.5)])),
      rec(1, Buffer.concat([f64(0.1), u16(101)])),
      rec(2, vlsd("")),
      rec(3, Buffer.concat([f64(0.2), f32(2.5)])),
    ]);
    b.setHd(0, b.dg(gA, b.dt(data), 2));
    const v = await values(save("unsorted.mf4", b));
    expect(v).toEqual({
      "A/t": [0, 0.1],
      "A/n_a": [100, 101],
      "C/t": [0, 0.2],
      "C/x_c": [1.5, 2.5],
    });
  });

  it("a virtual master's time is its conversion of the record number (and ms read as ms)", async () => {
    const b = new MdfBuilder();
    const g = b.cn({
      name: "gearbox speed",
      unit: "rpm",
      dataType: 4,
      byteOffset: 4,
      bitCount: 32,
    });
    const c = b.cn({
      next: g,
      name: "engine speed",
      unit: "1/min",
      dataType: 4,
      byteOffset: 0,
      bitCount: 32,
    });
    const t = b.cn({
      next: c,
      name: "t",
      unit: "ms",
      type: 3,
      sync: 1,
      dataType: 0,
      byteOffset: 0,
      bitCount: 0,
      cc: b.cc(1, [0, 0.5]),
    });
    const n = 4000;
    const data = Buffer.alloc(8 * n);
    for (let i = 0; i < n; i++) {
      data.writeFloatLE(1000, 8 * i);
      data.writeFloatLE(990, 8 * i + 4);
    }
    b.setHd(0, b.dg(b.cg({ cnFirst: t, cycles: n, dataBytes: 8 }), b.dt(data)));
    const r = await ingestMdf4File(save("virtual.mf4", b));
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    // Record i at 0.5·i ms = 0.0005·i s: 2 kHz.
    expect(r.value.timeS[3]).toBeCloseTo(0.0015, 12);
    expect(r.value.sampleRateHz).toBeCloseTo(2000, 6);
    // 1000 rpm = 1000·2π/60 rad/s (SI Brochure).
    expect(r.value.crankRadS[0]).toBeCloseTo((1000 * 2 * Math.PI) / 60, 9);
    expect(r.value.source.timeColumn).toBe("t");
  });

  it("a speed channel without a unit: the unit in its name, else an error asking for it", async () => {
    const file = (crankName: string) => {
      const b = new MdfBuilder();
      const g = b.cn({
        name: "gearbox speed",
        unit: "rad/s",
        dataType: 4,
        byteOffset: 12,
        bitCount: 32,
      });
      const c = b.cn({ next: g, name: crankName, dataType: 4, byteOffset: 8, bitCount: 32 });
      const t = b.timeMaster(c);
      const data = Buffer.alloc(16 * 3000);
      for (let i = 0; i < 3000; i++) {
        data.writeDoubleLE(i / 1000, 16 * i);
        data.writeFloatLE(900, 16 * i + 8);
        data.writeFloatLE(94, 16 * i + 12);
      }
      b.setHd(0, b.dg(b.cg({ cnFirst: t, cycles: 3000, dataBytes: 16 }), b.dt(data)));
      return save(`${crankName}.mf4`, b);
    };
    const bare = await ingestMdf4File(file("engine speed"));
    expect(!bare.ok && bare.error.code).toBe("unknown_unit");
    expect(!bare.ok && bare.error.message).toContain('"engine speed" has no unit');
    const named = await ingestMdf4File(file("engine speed [rpm]"));
    expect(named.ok && named.value.source.crankUnit).toBe("rpm");
    expect(named.ok && named.value.source.gearboxUnit).toBe("rad/s");
  });
});
