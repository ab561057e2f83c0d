import { describe, expect, it } from "vitest";
import { analyseDriveLog } from "./analyse.ts";
import { ingestCsv, type IngestOptions } from "./ingest.ts";
import type { ChannelName, DriveLog } from "./types.ts";

// One analytic drive log (built here, not read from a sample): a constant 1500 rpm crank with an
// order-2 ripple of 10 rpm 0-peak and a gearbox side with the same ripple at 1 rpm, phase −0.3
// rad, 2 kHz, 8 s. The gearbox-to-crank amplitude ratio is 1/10, so the isolation at the firing
// order is −20·log10(1/10) = 20 dB (the definition analyse.test.ts checks against the two-mass
// transmissibility, Harris' Shock and Vibration Handbook ch. 30). It is written as a plain CSV
// and as a logger export: preamble, units row, ';' and decimal comma, the logger's own names.
const FS = 2000;
const N = 8 * FS;
const W = 1500;
const omega = (W * 2 * Math.PI) / 60; // crank angle rate, rad/s
const crankAt = (t: number) => W + 10 * Math.sin(2 * omega * t);
const gearAt = (t: number) => W + 1 * Math.sin(2 * omega * t - 0.3);

function plain(): string {
  const lines = ["time [s],crank speed [rpm],gearbox input speed [rpm]"];
  for (let i = 0; i < N; i++) {
    const t = i / FS;
    lines.push([t.toFixed(4), crankAt(t).toPrecision(12), gearAt(t).toPrecision(12)].join(","));
  }
  return `${lines.join("\n")}\n`;
}

/** The example shape: "# Recorder: …", "Rate = …", a blank line, header, units row. */
function loggerExport(rate = "Rate = 2 kHz"): string {
  const comma = (s: string) => s.replace(".", ",");
  const lines = ["# Recorder: Kestrel DL-8 (s/n 0042)", rate, "", "t;n_kw;n_ge;gear"];
  lines.push("[s];[1/min];[1/min];[-]");
  for (let i = 0; i < N; i++) {
    const t = i / FS;
    const cells = [t.toFixed(4), crankAt(t).toPrecision(12), gearAt(t).toPrecision(12)];
    lines.push([...cells.map(comma), "3"].join(";"));
  }
  return `${lines.join("\n")}\n`;
}

const TEAM: ChannelName[] = [
  { name: "n_kw", role: "crank" },
  { name: "N_GE ", role: "gearbox" }, // matched ignoring case and spaces
];
const EXPLICIT: IngestOptions = { timeColumn: "t", crankColumn: "n_kw", gearboxColumn: "n_ge" };

function read(text: string, options: IngestOptions = {}) {
  const r = ingestCsv(text, options);
  if (!r.ok) throw new Error(`${r.error.code}: ${r.error.message} (row ${r.error.row})`);
  return { log: r.value, codes: r.warnings.map((w) => w.code), warnings: r.warnings };
}

function isolationAt1500(log: DriveLog): number {
  const out = analyseDriveLog(log);
  if (!out.ok) throw new Error(out.error.message);
  const p = out.value.isolation.find((x) => x.rpm === 1500);
  expect(p?.aboveNoise).toBe(true);
  return p?.dB ?? NaN;
}

describe("the issue's logger export", () => {
  it.each([
    ["with --time/--crank/--gearbox", EXPLICIT],
    ["with the team's channel names", { channelNames: TEAM }],
  ])("reads %s: units from the units row, metadata kept", (_, options) => {
    const { log, codes } = read(loggerExport(), options);
    expect(log.source).toMatchObject({
      rows: N,
      delimiter: ";",
      decimal: ",",
      timeColumn: "t",
      crankColumn: "n_kw",
      gearboxColumn: "n_ge",
      timeUnit: "s",
      crankUnit: "rpm",
      gearboxUnit: "rpm",
    });
    expect(log.source.metadata).toEqual([
      { key: "Recorder", value: "Kestrel DL-8 (s/n 0042)" },
      { key: "Rate", value: "2 kHz" },
    ]);
    expect(codes).not.toContain("unit_assumed");
    expect(codes).not.toContain("stated_rate_mismatch");
    // First data row (file line 6) is t = 0: crank 1500 rpm = 50π rad/s (1 rpm = 2π/60 rad/s).
    expect(log.crankRadS[0]).toBeCloseTo(50 * Math.PI, 9);
  });

  it("gives the plain CSV's isolation within 0.1 dB, and 20 dB from the amplitude ratio within 0.3 dB", () => {
    const a = isolationAt1500(read(plain()).log);
    const b = isolationAt1500(read(loggerExport(), { channelNames: TEAM }).log);
    expect(Math.abs(a - 20)).toBeLessThan(0.3);
    expect(Math.abs(b - a)).toBeLessThan(0.1);
  });
});

describe("a stated sample rate is checked against the time column (2000 Hz here)", () => {
  it.each([
    ["Rate = 2.5 kHz", "2500 Hz"],
    ["Sample rate: 1000 Hz", "1000 Hz"],
    ["Sampling interval = 0.4 ms", "2500 Hz"],
    ["Sample rate;2030", "2030 Hz"], // 1.5 % off: over the 1 % tolerance
  ])("%s disagrees: a warning naming both", (line, stated) => {
    const { warnings } = read(loggerExport(line), EXPLICIT);
    const w = warnings.find((x) => x.code === "stated_rate_mismatch");
    expect(w?.message).toContain(stated);
    expect(w?.message).toContain("2000 Hz");
  });
  it.each(["Rate = 2 kHz", "Sample rate: 2000 Hz", "Sampling interval = 0.5 ms", "fs=2010"])(
    "%s agrees (within 1 %%): no warning",
    (line) => {
      const { codes } = read(loggerExport(line), EXPLICIT);
      expect(codes).not.toContain("stated_rate_mismatch");
    },
  );
  it("a bus rate is not a sample rate", () => {
    const { codes } = read(loggerExport("CAN baud rate = 500 kHz"), EXPLICIT);
    expect(codes).not.toContain("stated_rate_mismatch");
  });
});

describe("team channel names", () => {
  const rows = ["0,800,800,810", "0.001,801,799,811", "0.002,802,798,812", "0.003,803,797,813"];
  const text = (h: string) => `${h}\n${rows.join("\n")}\n`;
  const cols = (r: ReturnType<typeof ingestCsv>) =>
    r.ok ? [r.value.source.crankColumn, r.value.source.gearboxColumn] : r.error.code;

  it("come before the built-in recognition", () => {
    // Built in, "engine speed" is the crank side; the team says its crank is n_kw.
    const r = ingestCsv(text("time,engine speed,n_ge,n_kw"), { channelNames: TEAM });
    expect(cols(r)).toEqual(["n_kw", "n_ge"]);
    // Without the team names the same file has no gearbox channel.
    expect(cols(ingestCsv(text("time,engine speed,n_ge,n_kw")))).toBe("missing_channel");
  });
  it("explicit columns still win", () => {
    const r = ingestCsv(text("time,engine speed,n_ge,n_kw"), {
      channelNames: TEAM,
      crankColumn: "engine speed",
    });
    expect(cols(r)).toEqual(["engine speed", "n_ge"]);
  });
  it("two columns with team names for one role are ambiguous, with both as candidates", () => {
    const r = ingestCsv(text("time,n_kw,n_ge,nMot"), {
      channelNames: [...TEAM, { name: "nmot", role: "crank" }],
    });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error).toMatchObject({ code: "ambiguous_columns" });
  });
  it("a team unit applies when the file says none, not over the file's own", () => {
    const team: ChannelName[] = [
      { name: "n_kw", role: "crank", unit: "deg/s" },
      { name: "n_ge", role: "gearbox", unit: "deg/s" },
    ];
    const bare = ingestCsv(text("time,x,n_ge,n_kw"), { channelNames: team });
    expect(bare.ok && bare.value.source.crankUnit).toBe("deg/s");
    // n_kw's first value, 810 deg/s = 810·π/180 rad/s (SI Brochure table 4).
    expect(bare.ok && bare.value.crankRadS[0]).toBeCloseTo((810 * Math.PI) / 180, 12);
    // The name's own unit wins; the team name still matches the name without it.
    const stated = ingestCsv(text("time,x,n_ge,n_kw [rpm]"), { channelNames: team });
    expect(stated.ok && stated.value.source.crankUnit).toBe("rpm");
  });
});
