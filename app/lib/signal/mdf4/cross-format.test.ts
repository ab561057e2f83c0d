/**
 * One drive log, three files: the independent MDF4 reference file drive-log-plain.mf4 (crank
 * speed at 2 kHz, gearbox speed at 1 kHz, each group with its own time master), and CSVs written
 * here from the values the independent reader found in it (drive-log-plain.expected.json) at the
 * gearbox's 1 kHz — plain, with `;` and decimal commas, and as a logger exports it (a preamble of
 * recorder metadata, logger channel names, a units row, `;` and decimal commas). The isolation at the firing order
 * agrees within 0.1 dB, as it must where the slower rate still covers the firing order: linear
 * interpolation weights a frequency f sampled at fs by sinc²(f/fs) (its triangular kernel's
 * transform; e.g. Oppenheim & Schafer, Discrete-Time Signal Processing, on interpolation — from
 * memory), so f ≤ 0.06·fs loses under 0.1 dB.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { analyseDriveLog } from "../analyse.ts";
import { ingestCsv } from "../ingest.ts";
import type { DriveLog, Outcome } from "../types.ts";
import { ingestMdf4File } from "./index.ts";

const fixtures = join(import.meta.dirname, "../../../../tests/fixtures/mdf4");
type Group = { channels: { name: string; values: number[] }[] };
const expected = JSON.parse(
  readFileSync(join(fixtures, "drive-log-plain.expected.json"), "utf8"),
) as { groups: Group[] };
const col = (g: Group, name: string) => g.channels.find((c) => c.name === name)!.values;
const [engine, gearbox] = expected.groups as [Group, Group];
const tE = col(engine, "time");
const nE = col(engine, "EngSpd");
const tG = col(gearbox, "time");
const nG = col(gearbox, "GbxInpShaftSpd");

function csv(sep: string, comma: boolean): string {
  const num = (x: number) => (comma ? String(x).replace(".", ",") : String(x));
  const lines = [["time [s]", "engine speed [rpm]", "gearbox speed [rpm]"].join(sep)];
  for (let k = 0; k < tG.length; k++) {
    // The crank sample recorded at the gearbox sample's time (every second one at 2 kHz).
    expect(tE[2 * k]).toBe(tG[k]);
    lines.push([tG[k]!, nE[2 * k]!, nG[k]!].map(num).join(sep));
  }
  return `${lines.join("\n")}\n`;
}

/** The same samples as a logger export: preamble, its own names, a units row, `;` and 12,5. */
function loggerExport(): string {
  const num = (x: number) => String(x).replace(".", ",");
  const lines = [
    "# Recorder: Kestrel bench logger",
    "Rate = 1 kHz",
    "Comment: KST-D4 slow ramp",
    "",
    "t;n_kw;n_ge",
    "[s];[1/min];[1/min]",
  ];
  for (let k = 0; k < tG.length; k++) lines.push([tG[k]!, nE[2 * k]!, nG[k]!].map(num).join(";"));
  return `${lines.join("\n")}\n`;
}

function isolation(ingested: Outcome<DriveLog>) {
  expect(ingested.ok).toBe(true);
  if (!ingested.ok) return [];
  const r = analyseDriveLog(ingested.value, {});
  expect(r.ok).toBe(true);
  return r.ok ? r.value.isolation : [];
}

describe("the same drive log as MDF4 (two rates) and as CSV", () => {
  it("gives the same isolation within 0.1 dB", async () => {
    const mdf = isolation(
      await ingestMdf4File(join(fixtures, "drive-log-plain.mf4"), {
        crankColumn: "EngSpd",
        gearboxColumn: "GbxInpShaftSpd",
      }),
    );
    const plain = isolation(ingestCsv(csv(",", false)));
    const comma = isolation(ingestCsv(csv(";", true)));
    expect(comma).toEqual(plain);
    const logger = isolation(
      ingestCsv(loggerExport(), {
        channelNames: [
          { name: "n_kw", role: "crank" },
          { name: "n_ge", role: "gearbox" },
        ],
      }),
    );
    expect(logger).toEqual(plain);
    const firingOrder = 2; // four cylinders, four strokes
    let compared = 0;
    for (const p of plain) {
      const m = mdf.find((x) => x.rpm === p.rpm);
      if (!m) continue;
      // Firing frequency within the band where interpolating the 1 kHz channel costs < 0.1 dB.
      expect((p.rpm / 60) * firingOrder).toBeLessThan(0.06 * 1000);
      expect(Math.abs(m.dB - p.dB), `${p.rpm} rpm`).toBeLessThan(0.1);
      compared++;
    }
    // The ramp covers 850–1350 rpm in 50 rpm bins: eleven points on each side.
    expect(compared).toBeGreaterThanOrEqual(10);
  });
});
