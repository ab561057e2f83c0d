/**
 * The reader against MDF4 files written and read by an implementation independent of this
 * project (tests/fixtures/mdf4/README.md): for all six, the same groups, channel names, units
 * and every value after conversion (1e-9 relative; scaled integers to 1e-9 of their resolution).
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { MdfFile } from "./file.ts";
import { ingestMdf4File, listMdf4Channels } from "./index.ts";
import { readRecords } from "./records.ts";
import { readStructure } from "./structure.ts";

const dir = join(import.meta.dirname, "../../../../tests/fixtures/mdf4");
const NAMES = [
  "drive-log-plain",
  "drive-log-deflate",
  "drive-log-transposed",
  "drive-log-chunked",
  "drive-log-unsorted",
  "types",
];

interface Expected {
  groups: {
    name: string;
    samples: number;
    master: string;
    channels: { name: string; unit: string; conversion: string; values: number[] }[];
  }[];
}
const expected = (name: string): Expected =>
  JSON.parse(readFileSync(join(dir, `${name}.expected.json`), "utf8")) as Expected;

/** Every channel's values as the reader decodes them, group by group. */
async function readAll(path: string) {
  const file = await MdfFile.open(path);
  try {
    const model = await readStructure(file);
    const groups: { name: string; channels: { name: string; unit: string; values: number[] }[] }[] =
      [];
    for (const dg of model.dataGroups) {
      const out = dg.groups.map((g) => ({
        group: g,
        channels: g.channels.map((c) => ({ channel: c, values: [] as number[] })),
      }));
      const wants = out.flatMap((o) =>
        o.channels.map((c) => ({
          group: o.group,
          channel: c.channel,
          sink: (v: Float64Array, n: number) => void c.values.push(...v.subarray(0, n)),
        })),
      );
      await readRecords(file, dg, wants);
      for (const o of out)
        groups.push({
          name: o.group.name,
          channels: o.channels.map((c) => ({
            name: c.channel.name,
            unit: c.channel.unit,
            values: c.values,
          })),
        });
    }
    return { model, groups };
  } finally {
    await file.close();
  }
}

describe("MDF4 reference files (independent writer and reader)", () => {
  for (const name of NAMES) {
    it(`${name}: groups, names, units and values match the independent reader`, async () => {
      const want = expected(name);
      const got = await readAll(join(dir, `${name}.mf4`));
      expect(got.groups.map((g) => g.name)).toEqual(want.groups.map((g) => g.name));
      want.groups.forEach((wg, gi) => {
        const gg = got.groups[gi]!;
        expect(gg.channels.map((c) => [c.name, c.unit])).toEqual(
          wg.channels.map((c) => [c.name, c.unit]),
        );
        wg.channels.forEach((wc, ci) => {
          const values = gg.channels[ci]!.values;
          expect(values.length).toBe(wg.samples);
          // Floats as stored: 1e-9 relative. Linear conversions are a·x + b in doubles on both
          // sides; their resolution a is ≥ 0.01 here, so 1e-9 of it is a far tighter bound.
          let worst = 0;
          wc.values.forEach((v, i) => {
            const err = Math.abs(values[i]! - v) / Math.max(1, Math.abs(v));
            if (err > worst) worst = err;
          });
          expect(worst, `${wg.name}/${wc.name}`).toBeLessThan(1e-9);
        });
      });
    });
  }

  it("the channel list gives each channel's group, unit, count, range and its group's rate", async () => {
    const want = expected("drive-log-plain");
    const list = await listMdf4Channels(join(dir, "drive-log-plain.mf4"));
    expect(list.ok).toBe(true);
    if (!list.ok) return;
    for (const g of want.groups) {
      const t = g.channels.find((c) => c.name === g.master)!.values;
      const rate = (t.length - 1) / (t[t.length - 1]! - t[0]!);
      for (const c of g.channels) {
        const info = list.value.find((x) => x.group === g.name && x.name.endsWith(c.name))!;
        expect(info.unit).toBe(c.unit);
        expect(info.samples).toBe(g.samples);
        expect(info.min).toBe(Math.min(...c.values));
        expect(info.max).toBe(Math.max(...c.values));
        expect(info.sampleRateHz).toBeCloseTo(rate, 6);
      }
    }
    // "EngSpd" says nothing recognition knows: no role until the user picks it.
    expect(list.value.find((x) => x.name === "EngSpd")?.role).toBeNull();
    expect(list.value.filter((x) => x.name.endsWith("time")).map((x) => x.name)).toEqual([
      "Engine/time",
      "Gearbox/time",
    ]);
  });

  it("recognised speed names get their roles, and the crank group's master is the time", async () => {
    const list = await listMdf4Channels(join(dir, "drive-log-unsorted.mf4"));
    expect(list.ok && list.value.map((c) => [c.name, c.role])).toEqual([
      ["Fast/t", "time"],
      ["crank_speed", "crank"],
      ["Slow/t", null],
      ["input_shaft_speed", "gearbox"],
    ]);
  });

  it("a drive log from two rates: crank samples as stored, gearbox linearly interpolated between its own", async () => {
    const want = expected("drive-log-plain");
    const eng = want.groups[0]!;
    const gbx = want.groups[1]!;
    const r = await ingestMdf4File(join(dir, "drive-log-plain.mf4"), {
      crankColumn: "EngSpd",
      gearboxColumn: "gearbox/GbxInpShaftSpd",
    });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const log = r.value;
    const rpm = (2 * Math.PI) / 60; // SI Brochure: 1 rpm = 2π/60 rad/s
    const tE = eng.channels[0]!.values;
    const nE = eng.channels[1]!.values;
    const tG = gbx.channels[0]!.values;
    const nG = gbx.channels[1]!.values;
    // The gearbox ends at 3.999 s; the crank's last sample (3.9995 s) lies beyond and is cut.
    expect(log.timeS.length).toBe(tE.filter((t) => t <= tG[tG.length - 1]!).length);
    for (let i = 0; i < log.timeS.length; i++) {
      expect(log.timeS[i]).toBe(tE[i]);
      expect(log.crankRadS[i]).toBeCloseTo(nE[i]! * rpm, 9);
      // Crank sample i sits at gearbox sample i/2 (even i) or halfway between two (odd i).
      const k = Math.floor(i / 2);
      const g = i % 2 === 0 ? nG[k]! : (nG[k]! + nG[k + 1]!) / 2;
      expect(log.gearboxRadS[i]).toBeCloseTo(g * rpm, 9);
    }
    expect(log.source).toMatchObject({
      format: "mdf4",
      delimiter: "",
      decimal: ".",
      timeColumn: "Engine/time",
      crankColumn: "EngSpd",
      gearboxColumn: "GbxInpShaftSpd",
      crankUnit: "rpm",
      gearboxUnit: "rpm",
      rows: log.timeS.length,
    });
    expect(log.source.metadata).toContainEqual({
      key: "comment",
      value: "synthetic drive log (mdf4_ref)",
    });
    expect(r.warnings.map((w) => w.code)).toContain("mdf4_rates_aligned");
  });

  it("a speed channel in an unknown unit is an error asking for the unit; the option fixes it", async () => {
    const path = join(dir, "types.mf4");
    const bad = await ingestMdf4File(path, { crankColumn: "f64", gearboxColumn: "scaled" });
    expect(bad.ok).toBe(false);
    if (!bad.ok) {
      expect(bad.error.code).toBe("unknown_unit");
      expect(bad.error.message).toContain('"Nm"');
    }
    const ok = await ingestMdf4File(path, {
      crankColumn: "f64",
      gearboxColumn: "scaled",
      gearboxUnit: "rpm",
    });
    expect(ok.ok || ok.error.code).not.toBe("unknown_unit");
  });
});
