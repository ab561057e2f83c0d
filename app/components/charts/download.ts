/** Browser-only: the charts' "PNG" and "CSV" downloads. */
import { fileSlug } from "./csv";
import { paintSwatch, SWATCH_WIDTH, type LegendEntry } from "./legend";
import { COLOURS, FONT_FAMILY } from "./palette";

export function downloadBlob(fileName: string, blob: Blob): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement("a");
  a.href = url;
  a.download = fileName;
  a.rel = "noopener";
  document.body.appendChild(a);
  a.click();
  a.remove();
  // Give the browser time to start the download before the URL goes.
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
}

export function downloadCsv(title: string, csv: string, suffix?: string): void {
  const name = [fileSlug(title), suffix].filter(Boolean).join("-");
  downloadBlob(`${name}.csv`, new Blob([csv], { type: "text/csv;charset=utf-8" }));
}

/**
 * The chart's canvas with its title drawn above and the legend below, on white, at the canvas's
 * own resolution (device pixels), downloaded as PNG.
 */
export async function downloadPng(
  title: string,
  source: HTMLCanvasElement,
  legend: LegendEntry[],
  suffix?: string,
): Promise<void> {
  const s = source.clientWidth > 0 ? source.width / source.clientWidth : 1;
  const pad = 12 * s;
  const titleH = 30 * s;
  const width = source.width + 2 * pad;
  const ctx0 = document.createElement("canvas").getContext("2d")!;
  ctx0.font = `${12 * s}px ${FONT_FAMILY}`;
  // Lay the legend out in rows that fit the width.
  const rows: { entry: LegendEntry; x: number }[][] = [[]];
  let x = pad;
  for (const entry of legend) {
    const w = (SWATCH_WIDTH + 6) * s + ctx0.measureText(entry.label).width + 16 * s;
    if (x + w > width - pad && rows[rows.length - 1]!.length) {
      rows.push([]);
      x = pad;
    }
    rows[rows.length - 1]!.push({ entry, x });
    x += w;
  }
  const rowH = 18 * s;
  const legendH = legend.length ? rows.length * rowH + 8 * s : 0;
  const canvas = document.createElement("canvas");
  canvas.width = width;
  canvas.height = titleH + source.height + legendH + pad;
  const ctx = canvas.getContext("2d")!;
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
  const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, "image/png"));
  if (!blob) throw new Error("The browser could not make the PNG.");
  const name = [fileSlug(title), suffix].filter(Boolean).join("-");
  downloadBlob(`${name}.png`, blob);
}
