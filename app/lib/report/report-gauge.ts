/**
 * The rattle check's gauge in the evidence report: vector bars against one limit line.
 */
import { niceRange, niceTicks, tickText, type Box } from "./report-charts";
import { COLOURS, type ReportDoc } from "./report-layout";

/**
 * A horizontal gauge: each figure a bar from 0 against one limit line, e.g. the rattle check's
 * two idle figures against the vehicle's limit. Returns nothing; the cursor moves under it.
 */
export function drawGauge(
  doc: ReportDoc,
  box: Box,
  spec: {
    unit: string;
    limit: { value: number; label: string };
    bars: readonly { label: string; value: number; text: string }[];
  },
): void {
  const pdf = doc.pdf;
  const labelW = 170;
  const plotX = box.x + labelW;
  const plotW = box.width - labelW - 70;
  const max = niceRange([spec.limit.value, ...spec.bars.map((b) => b.value)], { zero: true }).max;
  const px = (v: number) => plotX + (Math.max(0, v) / max) * plotW;
  const barH = 11;
  spec.bars.forEach((b, i) => {
    const y = box.y + 4 + i * (barH + 8);
    doc.text(b.label, box.x, y + 1, { size: 8, width: labelW - 6, lineGap: 0 });
    const over = b.value > spec.limit.value;
    pdf.rect(plotX, y, Math.max(0.5, px(b.value) - plotX), barH);
    pdf.fillColor(over ? COLOURS.fail : COLOURS.pass).fill();
    doc.text(b.text, px(b.value) + 4, y + 1, { size: 8, face: "bold", width: 90, lineGap: 0 });
  });
  const top = box.y;
  const bottom = box.y + 4 + spec.bars.length * (barH + 8);
  const lx = px(spec.limit.value);
  pdf.moveTo(lx, top).lineTo(lx, bottom).lineWidth(1.2).strokeColor(COLOURS.text);
  pdf.dash(3, { space: 2 }).stroke().undash();
  pdf
    .moveTo(plotX, bottom)
    .lineTo(plotX + plotW, bottom)
    .lineWidth(0.5)
    .strokeColor(COLOURS.zero);
  pdf.stroke();
  for (const v of niceTicks(0, max, 5)) {
    pdf
      .moveTo(px(v), bottom)
      .lineTo(px(v), bottom + 3)
      .stroke();
    doc.text(tickText(v), px(v) - 20, bottom + 4, {
      size: 7,
      width: 40,
      align: "center",
      colour: COLOURS.muted,
      lineGap: 0,
    });
  }
  doc.text(spec.limit.label, lx - 100, top - 11, {
    size: 7,
    width: 200,
    align: "center",
    lineGap: 0,
  });
  doc.text(`Gearbox-input angular acceleration, ${spec.unit}`, plotX, bottom + 14, {
    size: 7.5,
    width: plotW,
    align: "center",
    lineGap: 0,
  });
  doc.y = bottom + 28;
}
