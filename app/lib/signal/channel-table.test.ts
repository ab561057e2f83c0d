import { describe, expect, it } from "vitest";
import { channelTable } from "./channel-table.ts";
import type { ChannelInfo } from "./types.ts";

// Hand-made channel lists (the shape of ChannelInfo in types.ts), checked cell by cell.
const crank: ChannelInfo = {
  name: "EngSpd",
  unit: "rpm",
  group: "fast group",
  sampleRateHz: 2000,
  samples: 16000,
  min: 780.25,
  max: 3012.5,
  role: "crank",
};
const temp: ChannelInfo = {
  name: "oil temp",
  unit: null,
  group: null,
  sampleRateHz: null,
  samples: 0,
  min: null,
  max: null,
  role: null,
};

describe("channelTable", () => {
  it("prints a header and one line per channel, every field in its column", () => {
    const lines = channelTable([crank, temp]).split("\n");
    expect(lines).toHaveLength(3);
    expect(lines[0]!.split(/\s{2,}/)).toEqual([
      "name",
      "unit",
      "group",
      "rate Hz",
      "samples",
      "min",
      "max",
      "role",
    ]);
    expect(lines[1]!.trim().split(/\s{2,}/)).toEqual([
      "EngSpd",
      "rpm",
      "fast group",
      "2000",
      "16000",
      "780.25",
      "3012.5",
      "crank",
    ]);
    // What the file does not tell is "-", never "null" or "NaN".
    expect(lines[2]).not.toMatch(/null|NaN/);
    expect(lines[2]!.trim().split(/\s{2,}/)).toEqual([
      "oil temp",
      "-",
      "-",
      "-",
      "0",
      "-",
      "-",
      "-",
    ]);
  });

  it("right-aligns the numbers so they line up by their last digit", () => {
    const lines = channelTable([crank, { ...crank, name: "n", samples: 5 }]).split("\n");
    const end = (l: string, text: string) => l.indexOf(text) + text.length;
    expect(end(lines[1]!, "16000")).toBe(end(lines[2]!, " 5"));
  });

  it("an empty list is the header alone", () => {
    expect(channelTable([]).split("\n")).toHaveLength(1);
  });
});
