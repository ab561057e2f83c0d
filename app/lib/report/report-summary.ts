/**
 * The evidence report's first page: what is signed off, each claimed target's verdict with its
 * limit, least margin and the drive logs behind it, the deviations accepted, the note and, once
 * approved, the record's digest.
 */
import { claimTally } from "../domain/signoff";
import { damperLabels, type DamperType } from "../domain/drive-log-terms";
import { degreesText, orderNumber, radS2Text } from "../domain/format";
import { countText } from "../base/plural";
import type { ReportModel } from "./report-model";
import { COLOURS, type ReportDoc } from "./report-layout";
import { drawFacts, drawTable, type Cell } from "./report-tables";
import {
  claimStatusWords,
  limitText,
  marginText,
  stateText,
  targetScopeText,
  timeText,
  verdictWords,
} from "./report-text";

/** The report's title: the sign-off's, or the draft of the vehicle's current state. */
export function reportTitle(model: ReportModel): string {
  return model.signoffId === null
    ? `Evidence report: damper variant ${model.damperVariant}`
    : `Sign-off of damper variant ${model.damperVariant}`;
}

const statusColour = (s: string) =>
  s === "pass" ? COLOURS.pass : s === "fail" ? COLOURS.fail : COLOURS.muted;

export function drawSummary(doc: ReportDoc, model: ReportModel): void {
  doc.pdf.outline.addItem("Summary");
  doc.heading(reportTitle(model), 1);
  const v = model.vehicle;
  const damper = (damperLabels as Record<string, string>)[v.damperType as DamperType];
  drawFacts(doc, [
    ["Vehicle", `${v.identifier}, ${v.name}`],
    ["Damper", `${damper ?? v.damperType}, variant ${model.damperVariant}`],
    [
      "Vehicle limits",
      `Firing order ${v.firingOrder === null ? "not known" : orderNumber(v.firingOrder)}; rattle limit ${radS2Text(v.rattleLimitRadS2)}; damper travel ${
        v.damperTravelLimitDeg === null
          ? "not given"
          : `${degreesText(v.damperTravelLimitDeg)} stop to stop`
      }`,
    ],
    ["Programme", model.programme],
    [
      "State",
      model.signoffId === null
        ? `${stateText(model.state)}: a draft of the vehicle's analysed drive logs`
        : `Sign-off ${model.signoffId}: ${stateText(model.state)}`,
    ],
    ["Generated", `${timeText(model.generatedAt)} by Twistlog ${model.softwareVersion}`],
  ]);

  doc.heading(model.signoffId === null ? "Targets" : "Claimed targets", 2);
  if (model.claims.length === 0) {
    doc.para("No target is claimed, so there is no verdict to report.");
  } else {
    const t = claimTally(model.claims);
    const fails = model.claims.filter((c) => c.status === "fail").length;
    const open = model.claims.filter((c) => c.status === "not-covered").length;
    doc.para(
      `${countText(model.claims.length, "target")}: ${t.pass} pass, ${fails} fail, ${open} not covered; ${t.deviations} with a deviation accepted.`,
      { size: 9 },
    );
    const targets = new Map(model.targets.map((x) => [x.id, x]));
    drawTable(
      doc,
      [
        { header: "Target", width: 0.26 },
        { header: "Limit", width: 0.18 },
        { header: "Verdict", width: 0.14 },
        { header: "Least margin", width: 0.12, align: "right" },
        { header: "Drive logs (verdict, margin)", width: 0.3 },
      ],
      model.claims.map((c): Cell[] => {
        const target = targets.get(c.targetId);
        const scope = target ? `\n${targetScopeText(target)}` : "";
        return [
          { text: `${c.targetName}${scope}` },
          limitText(c),
          {
            text:
              c.status !== "pass" && c.deviation !== null
                ? `${claimStatusWords[c.status]}\nDeviation accepted`
                : claimStatusWords[c.status],
            face: "bold",
            colour: statusColour(c.status),
          },
          marginText(c.margin, c.unit),
          c.logs.length
            ? c.logs
                .map(
                  (l) =>
                    `${l.fileName}: ${verdictWords[l.status]}${l.margin === null ? "" : `, ${marginText(l.margin, c.unit)}`}`,
                )
                .join("\n")
            : "None",
        ];
      }),
    );
    doc.para(
      "The margin is positive where the drive log does better than the target, in the target's unit; the least margin is the smallest over the drive logs named for the target.",
      { size: 7.5, colour: COLOURS.muted },
    );
    const deviations = model.claims.filter((c) => c.deviation !== null);
    if (deviations.length) {
      doc.heading("Deviations accepted", 3, 30);
      for (const c of deviations)
        doc.para(
          `${c.targetName} (${claimStatusWords[c.status].toLowerCase()}): deviation accepted: ${c.deviation}`,
        );
    }
  }

  doc.heading("Note", 3, 20);
  doc.para(model.note.trim() ? model.note : "No note was written.", {
    colour: model.note.trim() ? COLOURS.text : COLOURS.muted,
  });

  doc.heading("Digest", 3, 24);
  if (model.digest) {
    doc.para(
      "SHA-256 of the approved record (its canonical JSON, RFC 8785); any change to the evidence gives another digest:",
      { size: 8.5, after: 2 },
    );
    doc.para(model.digest, { face: "bold", size: 8.5 });
  } else {
    doc.para(
      model.signoffId === null
        ? "A draft has no digest: it is not a sign-off."
        : "No digest yet: the record gets one when it is approved.",
      { colour: COLOURS.muted },
    );
  }
}
