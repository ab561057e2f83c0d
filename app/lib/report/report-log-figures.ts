/**
 * A drive log's figures in the evidence report besides its curves: the rattle check at idle
 * against the vehicle's limit, and the engine start/stop events with their figures.
 */
import { endStopMargin, eventNames } from "../domain/chart-data";
import {
  dbNumber,
  degreesNumber,
  radS2Number,
  radS2Text,
  rpmNumber,
  rpmText,
  secondsNumber,
  secondsText,
} from "../domain/format";
import type { ReportLog, ReportModel } from "./report-model";
import { drawGauge } from "./report-gauge";
import { COLOURS, CONTENT_WIDTH, MARGIN, type ReportDoc } from "./report-layout";
import { drawTable, type Cell } from "./report-tables";

type Result = ReportLog["result"];

export function drawRattle(doc: ReportDoc, model: ReportModel, result: Result) {
  doc.heading("Rattle check at idle", 3, 110);
  const idle = result.idle;
  const limit = model.vehicle.rattleLimitRadS2;
  if (!idle) {
    doc.para("No idle segment in this drive log, so no rattle check.", { colour: COLOURS.muted });
    return;
  }
  const value = Math.max(idle.gearboxAngAccelRadS2, idle.gearboxAngAccelPeakRadS2);
  const within = value <= limit;
  doc.para(
    `Idle at ${rpmText(idle.meanRpm)} for ${secondsText(idle.idleDurationS)}. The larger of the two figures, ${radS2Text(value)}, is ${within ? "within" : "over"} the vehicle's limit of ${radS2Text(limit)}${
      idle.limitRadS2 !== limit ? ` (the analysis ran with ${radS2Text(idle.limitRadS2)})` : ""
    }.`,
    { face: "bold", colour: within ? COLOURS.text : COLOURS.fail },
  );
  doc.y += 12;
  drawGauge(
    doc,
    { x: MARGIN.left, y: doc.y, width: CONTENT_WIDTH, height: 70 },
    {
      unit: "rad/s²",
      limit: { value: limit, label: `Limit ${radS2Text(limit)}` },
      bars: [
        {
          label: "Firing-order amplitude",
          value: idle.gearboxAngAccelRadS2,
          text: radS2Text(idle.gearboxAngAccelRadS2),
        },
        {
          label: "Time-domain peak",
          value: idle.gearboxAngAccelPeakRadS2,
          text: radS2Text(idle.gearboxAngAccelPeakRadS2),
        },
      ],
    },
  );
}

export function drawEvents(doc: ReportDoc, model: ReportModel, result: Result) {
  doc.heading("Engine starts and stops", 3, 60);
  const events = result.events;
  if (!events) {
    doc.para(
      "This analysis was made before start and stop events were measured; re-analysing the drive log adds them.",
      { colour: COLOURS.muted },
    );
    return;
  }
  if (events.length === 0) {
    doc.para("No engine start or stop was found in this drive log.", { colour: COLOURS.muted });
    return;
  }
  const travel = model.vehicle.damperTravelLimitDeg;
  const names = eventNames(events);
  drawTable(
    doc,
    [
      { header: "Event", width: 0.09 },
      { header: "From–to, s", width: 0.12, align: "right" },
      { header: "Resonance, rpm", width: 0.12, align: "right" },
      { header: "Peak amplification, dB", width: 0.14, align: "right" },
      { header: "Near resonance, s", width: 0.12, align: "right" },
      { header: "Peak gearbox-input angular acceleration, rad/s²", width: 0.17, align: "right" },
      { header: "Twist peak-to-peak, °", width: 0.12, align: "right" },
      { header: "End-stop margin, °", width: 0.12, align: "right" },
    ],
    events.map((e, i): Cell[] => {
      const margin = travel === null ? null : endStopMargin(e.twistPeakToPeakDeg, travel);
      return [
        names[i]!,
        `${secondsNumber(e.startS)}–${secondsNumber(e.endS)}`,
        e.resonanceRpm === null ? "Not resolved" : rpmNumber(e.resonanceRpm),
        e.peakAmplificationDb === null ? "Not resolved" : dbNumber(e.peakAmplificationDb),
        e.timeNearResonanceS === null ? "—" : secondsNumber(e.timeNearResonanceS),
        radS2Number(e.peakGearboxAngAccelRadS2),
        degreesNumber(e.twistPeakToPeakDeg),
        margin === null
          ? "—"
          : {
              text: degreesNumber(margin.marginDeg),
              face: margin.warn ? "bold" : "regular",
              colour: margin.warn ? COLOURS.fail : undefined,
            },
      ];
    }),
    { size: 7.5 },
  );
  doc.para(
    travel === null
      ? "The vehicle has no damper travel limit, so no end-stop margin. Near resonance: time within ±10 % of the resonance speed."
      : `End-stop margin = damper travel ${degreesNumber(travel)}° − twist peak-to-peak (the whole swing counted from one side); in red where it is at most 10 % of the travel. Near resonance: time within ±10 % of the resonance speed.`,
    { size: 7.5, colour: COLOURS.muted },
  );
}
