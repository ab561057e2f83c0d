/**
 * The evidence report (docs/evidence-report.md, docs/decisions/008-evidence-report.md): a PDF
 * drawn with pdfkit from a ReportModel. A4 portrait, a header on every page (vehicle, damper
 * variant, programme, state, date) and a footer with "Page i of n"; a summary page, per drive
 * log its facts, verdicts and vector charts with units on every axis, the traceability, the
 * approvals and the cautions. A draft carries the watermark "DRAFT" on every page.
 *
 * The model is all the renderer reads, and the PDF's creation date is the model's generatedAt,
 * so one model always gives the same bytes (pdfkit's file ID is derived from the metadata).
 */
import type { ReportModel } from "./report-model";
import { ReportDoc, type TextRecorder } from "./report-layout";
import { drawSummary, reportTitle } from "./report-summary";
import { drawLogPages } from "./report-log-pages";
import { drawApprovals, drawTraceability } from "./report-records";
import { dateText, shortHash, stateText } from "./report-text";

export async function renderEvidenceReport(model: ReportModel): Promise<Buffer> {
  return drawEvidenceReport(model, null);
}

/** renderEvidenceReport, with every drawn string passed to `recorder` (the glyph test). */
export async function drawEvidenceReport(
  model: ReportModel,
  recorder: TextRecorder,
): Promise<Buffer> {
  const v = model.vehicle;
  const footer = [
    model.softwareVersion,
    model.signoffId === null ? "Draft of the current state" : `Sign-off ${model.signoffId}`,
    model.digest ? `Digest ${shortHash(model.digest)}` : null,
    `Generated ${dateText(model.generatedAt)}`,
  ]
    .filter((x): x is string => x !== null)
    .join(" · ");
  const createdAt = new Date(model.generatedAt);
  const doc = new ReportDoc(
    {
      vehicle: `${v.identifier} · ${v.name}`,
      variant: model.damperVariant,
      programme: model.programme,
      state: stateText(model.state),
      date: dateText(model.date),
      footer,
      draft: model.draft,
    },
    {
      title: `${reportTitle(model)}, ${v.identifier}`,
      subject: `Evidence report of ${v.identifier} (${v.name}), damper variant ${model.damperVariant}`,
      createdAt: Number.isNaN(createdAt.getTime()) ? new Date(0) : createdAt,
    },
    recorder,
  );
  doc.newPage();
  drawSummary(doc, model);
  model.logs.forEach((entry, i) => drawLogPages(doc, model, entry, i));
  drawTraceability(doc, model);
  drawApprovals(doc, model);
  return doc.finish();
}
