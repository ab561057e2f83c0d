import { describe, expect, it } from "vitest";
import { moreCandidatesThanRoles } from "~/lib/domain/channel-candidates";
import type { ChannelInfo } from "~/lib/signal/types";

const ch = (name: string, unit: string | null, role: ChannelInfo["role"] = null): ChannelInfo => ({
  name,
  unit,
  group: null,
  sampleRateHz: 2000,
  samples: 100,
  min: 0,
  max: 1,
  role,
});

describe("more candidates than roles", () => {
  it("a time, two speeds and a gear column: no choice needed (the demo logs' shape)", () => {
    expect(
      moreCandidatesThanRoles([
        ch("t_ms", "ms", "time"),
        ch("flywheel speed", "rpm", "crank"),
        ch("transmission input speed", "rpm", "gearbox"),
        ch("gear", null),
      ]),
    ).toBe(false);
  });
  it("a third speed channel (a wheel speed in 1/min) is a candidate", () => {
    expect(
      moreCandidatesThanRoles([
        ch("t", "s", "time"),
        ch("n_kw", "1/min"),
        ch("n_ge", "1/min"),
        ch("n_rad", "1/min"),
      ]),
    ).toBe(true);
  });
  it("two time bases (two MDF4 groups) are candidates too", () => {
    expect(
      moreCandidatesThanRoles([
        ch("t", "s", "time"),
        ch("t_slow", "s"),
        ch("EngSpd", "rpm", "crank"),
        ch("GbxInpShaftSpd", "rpm", "gearbox"),
      ]),
    ).toBe(true);
  });
});
