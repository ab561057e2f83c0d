/**
 * Tables of the evidence report: a header row on a grey band, rows that wrap and continue on the
 * next page with the header again, and label–value lists (a drive log's facts).
 */
import type { FontFace } from "./report-fonts";
import { COLOURS, CONTENT_BOTTOM, CONTENT_WIDTH, MARGIN, type ReportDoc } from "./report-layout";

/** One column of a table: its header, share of the width and alignment. */
export interface Column {
  header: string;
  width: number;
  align?: "left" | "right";
}

/** A table cell: text, optionally in another face or colour. */
export type Cell = string | { text: string; face?: FontFace; colour?: string };

/**
 * A table under the cursor: header row in semibold on a grey band, rows that wrap, and on a
 * page break the header row again. Column widths are shares of `width` (they need not sum to 1).
 */
export function drawTable(
  doc: ReportDoc,
  columns: readonly Column[],
  rows: readonly (readonly Cell[])[],
  o: { size?: number; width?: number; x?: number } = {},
): void {
  const size = o.size ?? 8;
  const x0 = o.x ?? MARGIN.left;
  const total = o.width ?? CONTENT_WIDTH;
  const sum = columns.reduce((s, c) => s + c.width, 0);
  const widths = columns.map((c) => (c.width / sum) * total);
  const pad = 3;
  const cellOf = (c: Cell) => (typeof c === "string" ? { text: c } : c);
  const rowHeight = (cells: readonly Cell[], face: FontFace) =>
    Math.max(
      ...cells.map((c, i) => {
        const cell = cellOf(c);
        return doc.heightOf(cell.text, {
          size,
          face: cell.face ?? face,
          width: widths[i]! - 2 * pad,
          lineGap: 1,
        });
      }),
    ) +
    2 * pad;
  const drawRow = (cells: readonly Cell[], face: FontFace, band: boolean) => {
    const h = rowHeight(cells, face);
    const y = doc.y;
    if (band) doc.pdf.rect(x0, y, total, h).fillColor(COLOURS.band).fill();
    let x = x0;
    cells.forEach((c, i) => {
      const cell = cellOf(c);
      doc.text(cell.text, x + pad, y + pad, {
        size,
        face: cell.face ?? face,
        colour: cell.colour,
        width: widths[i]! - 2 * pad,
        align: columns[i]!.align ?? "left",
        lineGap: 1,
      });
      x += widths[i]!;
    });
    doc.pdf
      .moveTo(x0, y + h)
      .lineTo(x0 + total, y + h)
      .lineWidth(0.4)
      .strokeColor(COLOURS.rule)
      .stroke();
    doc.y = y + h;
  };
  const header = columns.map((c) => c.header);
  doc.ensure(rowHeight(header, "bold") + (rows[0] ? rowHeight(rows[0], "regular") : 0));
  drawRow(header, "bold", true);
  for (const row of rows) {
    const h = rowHeight(row, "regular");
    if (doc.y + h > CONTENT_BOTTOM) {
      doc.newPage();
      drawRow(header, "bold", true);
    }
    drawRow(row, "regular", false);
  }
  doc.y += 6;
}

/** Label–value pairs in two columns (the label muted), e.g. a drive log's facts. */
export function drawFacts(
  doc: ReportDoc,
  facts: readonly [string, string][],
  o: { labelWidth?: number; size?: number } = {},
): void {
  const size = o.size ?? 8.5;
  const lw = o.labelWidth ?? 120;
  for (const [label, value] of facts) {
    const h = Math.max(
      doc.heightOf(value, { size, width: CONTENT_WIDTH - lw }),
      doc.heightOf(label, { size, width: lw - 6 }),
    );
    doc.ensure(h + 2);
    const y = doc.y;
    doc.text(label, MARGIN.left, y, { size, colour: COLOURS.muted, width: lw - 6 });
    doc.text(value, MARGIN.left + lw, y, { size, width: CONTENT_WIDTH - lw });
    doc.y = y + h + 2;
  }
}
