import { describe, expect, it } from "vitest";
import { initialPicks } from "~/components/channel-picks";
import type { ChannelInfo } from "~/lib/signal/types";

// Hand-made channel lists (the ChannelInfo shape of app/lib/signal/types.ts).
const ch = (name: string, role: ChannelInfo["role"] = null): ChannelInfo => ({
  name,
  unit: null,
  group: null,
  sampleRateHz: 1000,
  samples: 10,
  min: 0,
  max: 1,
  role,
});
const list = [ch("Zeit"), ch("Kanal1"), ch("Kanal2"), ch("t", "time"), ch("EngSpd", "crank")];

describe("the channel chooser's preselection", () => {
  it("starts from the columns the last run used", () => {
    expect(
      initialPicks(list, {
        source: "remembered",
        mapping: { timeColumn: "Zeit", crankColumn: "Kanal1", gearboxColumn: "Kanal2" },
      }),
    ).toEqual({ time: "Zeit", crank: "Kanal1", gearbox: "Kanal2" });
  });
  it("falls back to the recognised roles, and to recognise for a role nobody has", () => {
    expect(initialPicks(list, null)).toEqual({ time: "t", crank: "EngSpd", gearbox: "" });
  });
  it("ignores a used column the file no longer has", () => {
    expect(
      initialPicks(list, {
        source: "chosen",
        mapping: { crankColumn: "gone", timeColumn: "Zeit" },
      }),
    ).toEqual({ time: "Zeit", crank: "EngSpd", gearbox: "" });
  });
});
