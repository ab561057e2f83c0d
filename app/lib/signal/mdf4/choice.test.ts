/**
 * Picking channels in an MDF4 file and the checks on what is picked: names shared by two groups,
 * the time base, times that do not increase, implausible speeds. Files built block by block
 * (tests/support/mdf4-builder.ts); expected record numbers counted by hand from the data written.
 */
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { MdfBuilder } from "../../../../tests/support/mdf4-builder.ts";
import { ingestMdf4File, listMdf4Channels } from "./index.ts";

const dir = mkdtempSync(join(tmpdir(), "twistlog-test-choice-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/**
 * Two groups ("A" at 1 kHz, "B" at 500 Hz), each with a master "t" and a speed channel named
 * "speed" unless `speedNames` says otherwise.
 */
function twoGroups(
  name: string,
  tweak: (i: number, t: number, rpm: number) => [number, number] = (_i, t, rpm) => [t, rpm],
  speedNames: [string, string] = ["speed", "speed"],
) {
  const b = new MdfBuilder();
  const group = (label: string, rateHz: number, n: number, next: number) => {
    const speedName = label === "A" ? speedNames[0] : speedNames[1];
    const s = b.cn({ name: speedName, unit: "rpm", dataType: 4, byteOffset: 8, bitCount: 32 });
    const t = b.timeMaster(s);
    const data = Buffer.alloc(12 * n);
    for (let i = 0; i < n; i++) {
      const [ti, v] = label === "A" ? tweak(i, i / rateHz, 1000) : [i / rateHz, 990];
      data.writeDoubleLE(ti, 12 * i);
      data.writeFloatLE(v, 12 * i + 8);
    }
    const cg = b.cg({ cnFirst: t, name: label, cycles: n, dataBytes: 12 });
    return b.dg(cg, b.dt(data), 0, next);
  };
  b.setHd(0, group("A", 1000, 3000, group("B", 500, 1500, 0)));
  const path = join(dir, name);
  writeFileSync(path, b.bytes());
  return path;
}

describe("picking MDF4 channels", () => {
  it("a recognised crank without a gearbox: its group's master is listed as time", async () => {
    const path = twoGroups("crank-only.mf4", undefined, ["crank speed", "shaft b"]);
    const list = await listMdf4Channels(path);
    const roles = list.ok ? list.value.map((c) => [c.name, c.role]) : [];
    expect(roles).toEqual([
      ["A/t", "time"],
      ["crank speed", "crank"],
      ["B/t", null],
      ["shaft b", null],
    ]);
  });

  const path = twoGroups("same-names.mf4");

  it("a name in two groups is shown and picked as group/name", async () => {
    const list = await listMdf4Channels(path);
    expect(list.ok && list.value.map((c) => c.name)).toEqual(["A/t", "A/speed", "B/t", "B/speed"]);
    const bare = await ingestMdf4File(path, { crankColumn: "speed", gearboxColumn: "B/speed" });
    expect(!bare.ok && bare.error.code).toBe("ambiguous_columns");
    expect(!bare.ok && bare.error.message).toContain('"group/name"');
    const r = await ingestMdf4File(path, { crankColumn: "A/speed", gearboxColumn: "B/speed" });
    expect(r.ok && r.value.source.timeColumn).toBe("A/t");
    expect(r.ok && r.value.source.crankColumn).toBe("A/speed");
  });

  it("time is the crank group's master; naming another channel is an error", async () => {
    const r = await ingestMdf4File(path, {
      crankColumn: "A/speed",
      gearboxColumn: "B/speed",
      timeColumn: "B/t",
    });
    expect(!r.ok && r.error.code).toBe("unknown_column");
    expect(!r.ok && r.error.message).toContain('master channel "A/t"');
  });

  it("a time that goes backwards is an error at its record", async () => {
    // Record 101 (index 100) written at 0.05 s, after 0.099 s.
    const back = twoGroups("back.mf4", (i, t, rpm) => [i === 100 ? 0.05 : t, rpm]);
    const r = await ingestMdf4File(back, { crankColumn: "A/speed", gearboxColumn: "B/speed" });
    expect(!r.ok && r.error).toMatchObject({
      code: "time_not_increasing",
      row: 101,
      column: "A/t",
    });
  });

  it("an implausible speed is an error at its record", async () => {
    // Record 2001 holds −500 rpm.
    const neg = twoGroups("neg.mf4", (i, t, rpm) => [t, i === 2000 ? -500 : rpm]);
    const r = await ingestMdf4File(neg, { crankColumn: "A/speed", gearboxColumn: "B/speed" });
    expect(!r.ok && r.error).toMatchObject({ code: "implausible_speed", row: 2001 });
  });
});
