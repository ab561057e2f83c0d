import { describe, expect, it } from "vitest";
import { degText, eventText, largestEventFigures, travelWarnings } from "./event-figures";

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
    expect(degText(52.25)).toBe("52.3°");
    expect(eventText({ kind: "stop", startS: 30.04 })).toBe("the engine stop at 30.0 s");
  });
});

describe("travelWarnings (issue 15: a start/stop event within 10 % of the travel limit)", () => {
  it("warns from 90 % of the limit on, says when the stops were reached, and not without a limit", () => {
    // Limit 60°: 54° is exactly 90 % → warned; 53.9° is not; 61° is beyond the limit.
    const events = [
      event("start", 0.5, 6, 53.9),
      event("stop", 20, 7, 54),
      event("stop", 40, 8, 61),
    ];
    expect(travelWarnings(events, 60)).toEqual([
      "The engine stop at 20.0 s twisted 54.0° peak to peak, within 10 % of the damper's 60.0° travel limit.",
      "The engine stop at 40.0 s twisted 61.0° peak to peak, at or beyond the damper's 60.0° travel limit: the end stops were probably reached.",
    ]);
    expect(travelWarnings(events, null)).toEqual([]);
    expect(travelWarnings(undefined, 60)).toEqual([]);
  });
});
