/**
 * The evidence report (docs/signoff.md, docs/decisions/008-evidence-report.md): a PDF drawn with
 * pdfkit from a ReportModel. A4, page numbers, a header on every page, a summary page, per drive
 * log its vector charts with units on every axis, the traceability table, the approvals and the
 * cautions; a draft carries the watermark "draft" on every page.
 */
import type { ReportModel } from "./report-model";

export async function renderEvidenceReport(model: ReportModel): Promise<Buffer> {
  void model;
  throw new Error("contract stub: report/evidence-report.ts");
}
