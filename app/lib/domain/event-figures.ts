/**
 * The figures of a drive log's engine start and stop events (result.events, issue 15) that the
 * analyses row, the targets and the damper-health trend use: the largest peak amplification
 * through the damper's resonance and the largest peak-to-peak twist. Pure, shared by server and
 * browser.
 */
import { fixed } from "./format";

/** What is read of one event (result.events[], app/lib/signal/result-schema.ts). */
export interface EventFigure {
  kind: "start" | "stop";
  startS: number;
  /** dB, positive = amplified; null when the firing order was not resolved in the event. */
  peakAmplificationDb: number | null;
  twistPeakToPeakDeg: number;
  /** Engine speed of least isolation in the event, rpm; null when not resolved. */
  resonanceRpm: number | null;
}

export interface LargestEventFigures {
  /** The largest peak amplification over the events, dB; null without an event that has one. */
  peakDb: number | null;
  peakEvent: EventFigure | null;
  /** The largest peak-to-peak twist over the events, degrees; null without events. */
  twistPpDeg: number | null;
  twistEvent: EventFigure | null;
}

/** The largest of each figure over the events (none → nulls). */
export function largestEventFigures(events: readonly EventFigure[] | null | undefined) {
  const out: LargestEventFigures = {
    peakDb: null,
    peakEvent: null,
    twistPpDeg: null,
    twistEvent: null,
  };
  for (const e of events ?? []) {
    if (
      e.peakAmplificationDb !== null &&
      (out.peakDb === null || e.peakAmplificationDb > out.peakDb)
    ) {
      out.peakDb = e.peakAmplificationDb;
      out.peakEvent = e;
    }
    if (out.twistPpDeg === null || e.twistPeakToPeakDeg > out.twistPpDeg) {
      out.twistPpDeg = e.twistPeakToPeakDeg;
      out.twistEvent = e;
    }
  }
  return out;
}

/** "the engine stop at 12.3 s" */
export function eventText(e: Pick<EventFigure, "kind" | "startS">): string {
  return `the engine ${e.kind} at ${fixed(e.startS, 1)} s`;
}
