import { describe, expect, it } from "vitest";
import { readCsvHead } from "./csv-head.ts";

// The head as the preview and the remembered-columns check read it (lib/data, lib/analyses):
// the same header the ingest finds, and no more of the stream than needed.
const PREAMBLE = [
  "# Recorder: Kestrel DL-8",
  "Rate = 1 kHz",
  "",
  "t;n_kw;n_ge",
  "[s];[1/min];[1/min]",
];
const row = (i: number) => `${(i / 1000).toFixed(3)};${800 + i};${790 + i}`.replaceAll(".", ",");

describe("readCsvHead", () => {
  it("finds the header behind the preamble and keeps the data lines asked for", async () => {
    const lines = [...PREAMBLE, ...Array.from({ length: 50 }, (_, i) => row(i))];
    const { head, prefix } = await readCsvHead([`${lines.join("\n")}\n`], {}, 20);
    if (!head.ok) throw new Error(head.error.message);
    expect(head.value).toMatchObject({
      headers: ["t", "n_kw", "n_ge"],
      units: ["s", "1/min", "1/min"],
      delimiter: ";",
      decimal: ",",
      headerLine: 4,
      lastHeadLine: 5,
      metadata: [
        { key: "Recorder", value: "Kestrel DL-8" },
        { key: "Rate", value: "1 kHz" },
      ],
      statedRateHz: 1000,
    });
    const after = new TextDecoder().decode(prefix.subarray(head.value.dataStart)).split("\n");
    expect(after.slice(0, 20)).toEqual(Array.from({ length: 20 }, (_, i) => row(i)));
  });

  it("stops pulling chunks once it has them (a long file costs the same as a short one)", async () => {
    let pulled = 0;
    async function* endless() {
      yield `${PREAMBLE.join("\n")}\n`;
      for (let i = 0; ; i++) {
        pulled++;
        yield `${row(i)}\n`;
      }
    }
    const { head } = await readCsvHead(endless(), {}, 3);
    expect(head.ok).toBe(true);
    expect(pulled).toBeLessThan(100);
  });
});
