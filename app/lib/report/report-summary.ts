/**
 * The evidence report's first page: what is signed off, each claimed target's verdict with its
 * limit, least margin and the drive logs behind it, the deviations accepted, the note and, once
 * approved, the record's digest.
 */
import { claimTally, type ClaimCheck } from "../domain/signoff";
import { damperLabels, type DamperType } from "../domain/drive-log-terms";
import { degreesText, orderNumber, radS2Text } from "../domain/format";
import { countText } from "../base/plural";
import type { ReportModel } from "./report-model";
import { COLOURS, type ReportDoc } from "./report-layout";
import { drawFacts, drawTable, type Cell } from "./report-tables";
import {
  claimStatusWords,
  limitText,
  logConditionText,
  marginText,
  stateText,
  targetScopeText,
  timeText,
  verdictWords,
} from "./report-text";

/** Up to this many drive logs a claim names them with their verdicts; more go by number. */
const NAMED_LOGS = 4;

/**
 * The drive logs behind a claim: each by name with its verdict and margin, or, when there are
 * many, their numbers (as in "Drive logs in this report") grouped by verdict.
 */
function logsText(c: ClaimCheck, numberOf: ReadonlyMap<number, number>): string {
  if (c.logs.length === 0) return "None";
  if (c.logs.length <= NAMED_LOGS)
    return c.logs
      .map(
        (l) =>
          `${l.fileName}: ${verdictWords[l.status]}${l.margin === null ? "" : `, ${marginText(l.margin, c.unit)}`}`,
      )
      .join("\n");
  const groups = (["fail", "pass", "not-covered", "not-applicable"] as const).flatMap((status) => {
    const numbers = c.logs
      .filter((l) => l.status === status)
      .map((l) => numberOf.get(l.logId) ?? 0)
      .sort((a, b) => a - b);
    return numbers.length ? [`${verdictWords[status]}: no. ${numbers.join(", ")}`] : [];
  });
  return groups.join("\n");
}

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
    ["Generated", `${timeText(model.generatedAt)} by ${model.softwareVersion}`],
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
    const numberOf = new Map(model.logs.map((l, i) => [l.log.id, i + 1]));
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
          logsText(c, numberOf),
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

  if (model.logs.length) {
    doc.heading("Drive logs in this report", 3, 40);
    drawTable(
      doc,
      [
        { header: "No.", width: 0.06, align: "right" },
        { header: "Drive log", width: 0.44 },
        { header: "Test", width: 0.34 },
        { header: "Analysis", width: 0.16 },
      ],
      model.logs.map(({ log }, i) => [
        String(i + 1),
        log.fileName,
        logConditionText(log),
        `version ${log.analysis.version}`,
      ]),
      { size: 7.5 },
    );
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
