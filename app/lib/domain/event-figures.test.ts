import { describe, expect, it } from "vitest";
import { eventText, largestEventFigures } from "./event-figures";
import { degreesText } from "./format";

// The largest figures over a drive log's start/stop events (issue 15), hand-picked inputs.
const event = (kind: "start" | "stop", startS: number, peak: number | null, twist: number) => ({
  kind,
  startS,
  peakAmplificationDb: peak,
  twistPeakToPeakDeg: twist,
  resonanceRpm: 440,
});

describe("largestEventFigures", () => {
  it("takes the largest peak amplification and the largest twist, each with its event", () => {
    const a = event("start", 0.4, 7.5, 41);
    const b = event("stop", 30, -1.5, 44.5);
    const c = event("stop", 60, null, 12);
    const f = largestEventFigures([a, b, c]);
    expect(f).toEqual({ peakDb: 7.5, peakEvent: a, twistPpDeg: 44.5, twistEvent: b });
  });
  it("gives nulls without events, and no amplification when none was resolved", () => {
    const none = { peakDb: null, peakEvent: null, twistPpDeg: null, twistEvent: null };
    expect(largestEventFigures(undefined)).toEqual(none);
    expect(largestEventFigures([])).toEqual(none);
    const only = event("start", 1, null, 9);
    expect(largestEventFigures([only])).toEqual({ ...none, twistPpDeg: 9, twistEvent: only });
  });
  it("writes degrees to one decimal and names the event", () => {
    expect(degreesText(52.25)).toBe("52.3°");
    expect(eventText({ kind: "stop", startS: 30.04 })).toBe("the engine stop at 30.0 s");
  });
});
