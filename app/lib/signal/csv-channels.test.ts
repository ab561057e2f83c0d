import { describe, expect, it } from "vitest";
import { listCsvChannels } from "./csv-channels.ts";
import type { ChannelName } from "./types.ts";

// A small logger export written by the test from formulas: 500 Hz, 1200 rows; crank
// 900 + 50·sin(i/40) rpm, gearbox 880 + 40·cos(i/35) rpm, an oil temperature with every 7th
// cell empty (a dropout) and a gear column of text ("N" for the first 100 rows). The expected
// counts, ranges and rate are computed independently here from the same values with Math.min /
// Math.max, and the rate as (n − 1) / (t_last − t_first) (the mean sampling rate).
const FS = 500;
const N = 1200;
const t = Array.from({ length: N }, (_, i) => i / FS);
const crank = t.map((_, i) => Number((900 + 50 * Math.sin(i / 40)).toFixed(3)));
const gear = t.map((_, i) => Number((880 + 40 * Math.cos(i / 35)).toFixed(3)));
const oil = t.map((_, i) => (i % 7 === 3 ? NaN : Number((80 + i / 100).toFixed(2))));
const gearNo = t.map((_, i) => (i < 100 ? "N" : "2"));

function text(): string {
  const lines = ["# Recorder: Kestrel DL-8", "Sample rate: 500 Hz", "", "t;n_kw;n_ge;t_oil;gang"];
  lines.push("[s];[1/min];[1/min];[°C];[-]");
  for (let i = 0; i < N; i++) {
    const cells = [t[i]!.toFixed(3), String(crank[i]), String(gear[i])];
    cells.push(Number.isNaN(oil[i]) ? "" : String(oil[i]), gearNo[i]!);
    lines.push(cells.join(";").replaceAll(".", ","));
  }
  return `${lines.join("\r\n")}\r\n`;
}

const TEAM: ChannelName[] = [
  { name: "n_kw", role: "crank" },
  { name: "n_ge", role: "gearbox" },
];

async function* chunks(s: string, size: number) {
  const b = new TextEncoder().encode(s);
  for (let i = 0; i < b.length; i += size) yield b.subarray(i, i + size);
}

const finite = (v: number[]) => v.filter(Number.isFinite);

describe("listCsvChannels", () => {
  it("lists every column with unit, rate, count, range and role (team names)", async () => {
    const r = await listCsvChannels(chunks(text(), 1 << 16), { channelNames: TEAM });
    if (!r.ok) throw new Error(r.error.message);
    const rate = (N - 1) / (t[N - 1]! - t[0]!);
    const want = [
      { name: "t", unit: "s", values: t, role: "time" },
      { name: "n_kw", unit: "1/min", values: crank, role: "crank" },
      { name: "n_ge", unit: "1/min", values: gear, role: "gearbox" },
      { name: "t_oil", unit: "°C", values: oil, role: null },
      { name: "gang", unit: null, values: gearNo.map(Number), role: null },
    ];
    expect(r.value).toHaveLength(want.length);
    want.forEach((w, k) => {
      const got = r.value[k]!;
      const v = finite(w.values);
      expect(got).toMatchObject({ name: w.name, unit: w.unit, group: null, role: w.role });
      expect(got.samples).toBe(v.length);
      expect(got.min).toBe(Math.min(...v));
      expect(got.max).toBe(Math.max(...v));
      expect(got.sampleRateHz).toBeCloseTo(rate, 9);
    });
    expect(r.value[3]!.samples).toBe(N - Math.ceil((N - 3) / 7)); // every 7th from row 3 empty
  });

  it("gives the same list whatever the chunk size", async () => {
    const whole = await listCsvChannels(chunks(text(), 1 << 20), { channelNames: TEAM });
    for (const size of [1, 13, 4096]) {
      expect(await listCsvChannels(chunks(text(), size), { channelNames: TEAM })).toEqual(whole);
    }
  });

  it("without names for the speeds: roles only where the built-in words are sure", async () => {
    const r = await listCsvChannels(chunks(text(), 4096));
    if (!r.ok) throw new Error(r.error.message);
    expect(r.value.map((c) => c.role)).toEqual(["time", null, null, null, null]);
  });

  it("reads quoted cells as the ingest does", async () => {
    const quoted = 'time [s],"crank [rpm]",gearbox [rpm]\n0,"800.5",790\n0.001,"801.5",791\n';
    const r = await listCsvChannels(chunks(quoted, 7));
    if (!r.ok) throw new Error(r.error.message);
    expect(r.value[1]).toMatchObject({
      name: "crank [rpm]",
      unit: "rpm",
      samples: 2,
      min: 800.5,
      max: 801.5,
    });
    expect(r.value[0]!.sampleRateHz).toBeCloseTo(1000, 9); // (2 − 1) / 0.001 s
  });

  it("an empty file and a binary file are errors as values", async () => {
    const empty = await listCsvChannels(chunks("", 10));
    expect(empty.ok || empty.error.code).toBe("empty_file");
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]);
    const bin = await listCsvChannels(
      (async function* () {
        yield png;
      })(),
    );
    expect(bin.ok || bin.error.code).toBe("not_text");
  });
});
