/**
 * The evidence report's closing pages: the traceability of every figure (raw file and its
 * SHA-256, upload, analysis version and settings, result checksum, software version, the
 * targets as they were), the approvals and history, and the cautions.
 */
import { CAUTIONS } from "../domain/cautions";
import type { SignoffState } from "../domain/signoff";
import type { ReportModel } from "./report-model";
import { COLOURS, CONTENT_WIDTH, MARGIN, type ReportDoc } from "./report-layout";
import { drawFacts, drawTable } from "./report-tables";
import {
  limitText,
  logConditionText,
  otherSettingsText,
  settingsText,
  sizeText,
  targetScopeText,
  timeText,
} from "./report-text";
import { TARGET_LIMIT } from "../domain/targets";

const kindWords = {
  isolation: "Isolation",
  rattle: "Rattle at idle",
  "start-stop": "Start/stop amplification",
  "twist-margin": "End-stop margin",
} as const;

export function drawTraceability(doc: ReportDoc, model: ReportModel): void {
  doc.newPage();
  doc.pdf.outline.addItem("Traceability");
  doc.heading("Traceability", 2);
  doc.para(
    `Every figure in this report comes from the raw files below, analysed by the analysis version named, with the settings shown, by ${model.softwareVersion}. The SHA-256 of a raw file identifies its bytes as uploaded; the result checksum identifies the stored result the charts and verdicts were drawn from.`,
  );
  if (model.logs.length === 0)
    doc.para("No drive log is part of this report.", { colour: COLOURS.muted });
  model.logs.forEach(({ log }, i) => {
    doc.heading(`${i + 1}. ${log.fileName}`, 3, 120);
    drawFacts(
      doc,
      [
        ["File SHA-256", log.sha256],
        ["Size", sizeText(log.sizeBytes)],
        ["Uploaded", timeText(log.uploadedAt)],
        ["Test", `${logConditionText(log)}; damper variant ${log.damperVariant}`],
        [
          "Analysis",
          `Analysis ${log.analysis.id}, version ${log.analysis.version}, made ${timeText(log.analysis.createdAt)}`,
        ],
        ["Result SHA-256", log.analysis.resultSha256],
        ["Key settings", settingsText(log.analysis.settings)],
        ["Other settings", otherSettingsText(log.analysis.settings)],
        ["Software", model.softwareVersion],
      ],
      { size: 8, labelWidth: 96 },
    );
  });

  doc.heading("Targets as recorded", 3, 60);
  if (model.targets.length === 0) {
    doc.para("The vehicle has no targets.", { colour: COLOURS.muted });
    return;
  }
  drawTable(
    doc,
    [
      { header: "Target", width: 0.24 },
      { header: "Kind", width: 0.16 },
      { header: "Limit", width: 0.2 },
      { header: "Applies to", width: 0.22 },
      { header: "Last changed", width: 0.18 },
    ],
    model.targets.map((t) => [
      t.name,
      kindWords[t.kind],
      limitText({
        kind: t.kind,
        unit: TARGET_LIMIT[t.kind].unit,
        limit: t[TARGET_LIMIT[t.kind].field] ?? 0,
      }),
      targetScopeText(t),
      timeText(t.updatedAt),
    ]),
    { size: 7.5 },
  );
}

const stepWords: Record<SignoffState, string> = {
  proposed: "Proposed",
  approved: "Approved",
  rejected: "Rejected",
  superseded: "Superseded",
  withdrawn: "Withdrawn",
};

export function drawApprovals(doc: ReportDoc, model: ReportModel): void {
  doc.newPage();
  doc.pdf.outline.addItem("Approvals and history");
  doc.heading("Approvals and history", 2);
  if (model.steps.length === 0) {
    doc.para(
      model.signoffId === null
        ? "A draft of the vehicle's current state: nobody has proposed or approved it."
        : "No step is recorded.",
      { colour: COLOURS.muted },
    );
  } else {
    drawTable(
      doc,
      [
        { header: "Step", width: 0.14 },
        { header: "By", width: 0.22 },
        { header: "When", width: 0.2 },
        { header: "What they wrote", width: 0.44 },
      ],
      model.steps.map((s) => [
        { text: stepWords[s.step], face: "bold" },
        s.by,
        timeText(s.at),
        s.text.trim() ? s.text : "—",
      ]),
    );
    doc.para(
      "Four eyes: the person who proposes a sign-off never approves it. An approved sign-off never changes; new evidence supersedes it, and withdrawing it is a step of its own.",
      { size: 7.5, colour: COLOURS.muted },
    );
  }
  drawCautions(doc, model);
}

function drawCautions(doc: ReportDoc, model: ReportModel): void {
  doc.pdf.outline.addItem("Cautions");
  doc.heading("Cautions", 2, 80);
  const paragraphs = model.cautions.length ? model.cautions : CAUTIONS;
  for (const p of paragraphs) {
    const h = doc.heightOf(p, { width: CONTENT_WIDTH - 14 });
    doc.ensure(h + 4);
    const y = doc.y;
    doc.pdf
      .circle(MARGIN.left + 3, y + 5, 1.6)
      .fillColor(COLOURS.warning)
      .fill();
    doc.text(p, MARGIN.left + 14, y, { width: CONTENT_WIDTH - 14, after: 5 });
  }
}
