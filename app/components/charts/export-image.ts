/**
 * The image behind the charts' "PNG" buttons, pure apart from the canvas it is handed: the
 * chart's title above, the plot, the legend, and a caption strip at the bottom that says where
 * the figure comes from (vehicle, drive log, analysis version and id, analysis date, export date,
 * chart title), so a PNG pasted into a report can be traced back.
 */
import { paintSwatch, SWATCH_WIDTH, type LegendEntry } from "./legend";
import { COLOURS, FONT_FAMILY } from "./palette";
import type { ExportContext } from "./types";

/** The caption strip's background (neutral-100): the browser test looks for it. */
export const CAPTION_FILL = "#f5f5f5";

/** "2026-03-14 09:05 UTC" (UTC, as the pages show times). */
export function utcMinute(date: Date | string): string {
  const d = typeof date === "string" ? new Date(date) : date;
  if (Number.isNaN(d.getTime())) return String(date);
  return `${d.toISOString().slice(0, 16).replace("T", " ")} UTC`;
}

/** The caption's lines: what is shown, from which data, made when. */
export function captionLines(title: string, context: ExportContext, exportedAt: Date): string[] {
  const source = [
    context.vehicle ? `Vehicle: ${context.vehicle}` : null,
    context.driveLog ? `Drive log: ${context.driveLog}` : null,
  ].filter(Boolean);
  const a = context.analysis;
  return [
    source.length ? `${title} · ${source.join(" · ")}` : title,
    [
      a ? `Analysis version ${a.version} (id ${a.id}), made ${utcMinute(a.createdAt)}` : null,
      `Exported ${utcMinute(exportedAt)} from Twistlog`,
    ]
      .filter(Boolean)
      .join(" · "),
  ];
}

/** The few canvas members the composition uses (a DOM canvas, or a stand-in in the unit tests). */
export interface CanvasLike {
  width: number;
  height: number;
  getContext(kind: "2d"): CanvasRenderingContext2D | null;
}

/**
 * Draws the export onto a new canvas from `makeCanvas`, at the source canvas's own resolution
 * (`scale` device pixels per CSS pixel).
 */
export function composeExport(
  makeCanvas: () => CanvasLike,
  source: CanvasImageSource & { width: number; height: number },
  scale: number,
  title: string,
  legend: LegendEntry[],
  caption: string[],
): CanvasLike {
  const s = scale;
  const pad = 12 * s;
  const titleH = 30 * s;
  const width = source.width + 2 * pad;
  const canvas = makeCanvas();
  const ctx = canvas.getContext("2d")!;
  ctx.font = `${12 * s}px ${FONT_FAMILY}`;
  // Lay the legend out in rows that fit the width.
  const rows: { entry: LegendEntry; x: number }[][] = [[]];
  let x = pad;
  for (const entry of legend) {
    const w = (SWATCH_WIDTH + 6) * s + ctx.measureText(entry.label).width + 16 * s;
    if (x + w > width - pad && rows[rows.length - 1]!.length) {
      rows.push([]);
      x = pad;
    }
    rows[rows.length - 1]!.push({ entry, x });
    x += w;
  }
  const rowH = 18 * s;
  const legendH = legend.length ? rows.length * rowH + 8 * s : 0;
  const captionLineH = 16 * s;
  const captionH = caption.length ? caption.length * captionLineH + 12 * s : 0;
  const captionTop = titleH + source.height + legendH + pad;

  canvas.width = width;
  canvas.height = captionTop + captionH;
  // A resize resets the context's state: set everything again.
  ctx.fillStyle = "#ffffff";
  ctx.fillRect(0, 0, canvas.width, canvas.height);
  ctx.fillStyle = COLOURS.text;
  ctx.font = `600 ${15 * s}px ${FONT_FAMILY}`;
  ctx.textBaseline = "middle";
  ctx.fillText(title, pad, titleH / 2 + 2 * s);
  ctx.drawImage(source, pad, titleH);
  ctx.font = `${12 * s}px ${FONT_FAMILY}`;
  rows.forEach((row, r) => {
    const y = titleH + source.height + 8 * s + r * rowH;
    for (const { entry, x } of row) {
      paintSwatch(ctx, entry, x, y, s);
      ctx.fillStyle = COLOURS.text;
      ctx.fillText(entry.label, x + (SWATCH_WIDTH + 6) * s, y + 6 * s);
    }
  });
  if (captionH) {
    ctx.fillStyle = CAPTION_FILL;
    ctx.fillRect(0, captionTop, canvas.width, captionH);
    ctx.fillStyle = COLOURS.axis;
    ctx.font = `${11 * s}px ${FONT_FAMILY}`;
    ctx.textBaseline = "middle";
    caption.forEach((line, i) =>
      ctx.fillText(line, pad, captionTop + 6 * s + (i + 0.5) * captionLineH, width - 2 * pad),
    );
  }
  return canvas;
}
