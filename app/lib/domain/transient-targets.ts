/**
 * The verdicts of the two start/stop target kinds (issue 15; product rule, docs/targets.md):
 *
 * - "start-stop": the largest peak amplification through the damper's resonance over the drive
 *   log's engine starts and stops at most `maxDb` dB; margin = maxDb − value.
 * - "twist-margin": the margin of the largest start/stop peak-to-peak twist to the vehicle's
 *   damper travel limit (stop to stop), value = limit − twist, at least `minMarginDeg` degrees;
 *   margin = value − minMarginDeg.
 *
 * A log without start/stop events is "not-covered"; a result stored before events were
 * detected is "not-covered" and says to re-analyse; a twist-margin target of a vehicle without
 * a travel limit is "not-applicable".
 */
import { countText } from "../base/plural";
import { endStopMargin } from "./chart-data";
import { eventText, largestEventFigures } from "./event-figures";
import { dbText, degreesText, rpmText } from "./format";
import type { Target, TargetEvidence, TargetVerdict } from "./targets";

const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;

export const REANALYSE_TEXT =
  "This analysis was saved before engine starts and stops were detected; re-analyse the drive log to judge it.";
export const NO_EVENTS_TEXT = "No engine start or stop in this drive log.";
export const NO_TRAVEL_LIMIT_TEXT =
  "The vehicle has no damper travel limit; enter it on the vehicle's edit page to judge the twist margin.";

const none = { value: null, margin: null, atRpm: null } as const;

export function startStopVerdict(t: Target, result: TargetEvidence): TargetVerdict {
  const maxDb = t.maxDb ?? 0;
  const shell = { targetId: t.id, name: t.name, kind: t.kind, unit: "dB" as const, limit: maxDb };
  const events = result.events;
  if (!events) return { ...shell, ...none, status: "not-covered", detail: REANALYSE_TEXT };
  if (events.length === 0)
    return { ...shell, ...none, status: "not-covered", detail: NO_EVENTS_TEXT };
  const { peakDb, peakEvent } = largestEventFigures(events);
  if (peakDb === null || !peakEvent)
    return {
      ...shell,
      ...none,
      status: "not-covered",
      detail: `The firing order was not resolved in the drive log's ${countText(events.length, "start/stop event")}, so there is no peak amplification to judge.`,
    };
  const margin = round(maxDb - peakDb, 2);
  const pass = peakDb <= maxDb;
  const unresolved = events.filter((e) => e.peakAmplificationDb === null).length;
  const where =
    peakEvent.resonanceRpm !== null ? ` (resonance at ${rpmText(peakEvent.resonanceRpm)})` : "";
  const note = unresolved
    ? ` ${countText(unresolved, "event")} of ${events.length} could not be resolved.`
    : "";
  return {
    ...shell,
    status: pass ? "pass" : "fail",
    value: peakDb,
    margin,
    atRpm: peakEvent.resonanceRpm,
    detail: `Largest peak amplification ${dbText(peakDb)} in ${eventText(peakEvent)}${where}: ${dbText(Math.abs(margin))} ${pass ? "below" : "over"} the target.${note}`,
  };
}

export function twistMarginVerdict(t: Target, result: TargetEvidence): TargetVerdict {
  const minMargin = t.minMarginDeg ?? 0;
  const shell = {
    targetId: t.id,
    name: t.name,
    kind: t.kind,
    unit: "°" as const,
    limit: minMargin,
  };
  const travel = result.damperTravelLimitDeg;
  if (travel === null)
    return { ...shell, ...none, status: "not-applicable", detail: NO_TRAVEL_LIMIT_TEXT };
  const events = result.events;
  if (!events) return { ...shell, ...none, status: "not-covered", detail: REANALYSE_TEXT };
  const { twistPpDeg, twistEvent } = largestEventFigures(events);
  if (twistPpDeg === null || !twistEvent)
    return { ...shell, ...none, status: "not-covered", detail: NO_EVENTS_TEXT };
  const value = round(endStopMargin(twistPpDeg, travel).marginDeg, 3);
  const margin = round(value - minMargin, 2);
  const pass = margin >= 0;
  const toStops =
    value >= 0
      ? `${degreesText(value)} short of the ${degreesText(travel)} travel limit`
      : `${degreesText(-value)} beyond the ${degreesText(travel)} travel limit (the end stops were reached)`;
  return {
    ...shell,
    status: pass ? "pass" : "fail",
    value,
    margin,
    atRpm: twistEvent.resonanceRpm,
    detail: `Largest twist ${degreesText(twistPpDeg)} peak to peak in ${eventText(twistEvent)}, ${toStops}: ${degreesText(Math.abs(margin))} ${pass ? "more" : "less"} margin than the target.`,
  };
}
