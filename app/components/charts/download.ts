/** Browser-only: the charts' "PNG" and "CSV" downloads. */
import { fileSlug } from "./csv";
import { captionLines, composeExport } from "./export-image";
import type { LegendEntry } from "./legend";
import type { ExportContext } from "./types";

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
 * The chart's canvas with its title drawn above, the legend below and the caption strip (where
 * the figure comes from, export-image.ts) at the bottom, on white, at the canvas's own resolution
 * (device pixels), downloaded as PNG.
 */
export async function downloadPng(
  title: string,
  source: HTMLCanvasElement,
  legend: LegendEntry[],
  suffix?: string,
  context: ExportContext = {},
): Promise<void> {
  const s = source.clientWidth > 0 ? source.width / source.clientWidth : 1;
  const canvas = composeExport(
    () => document.createElement("canvas"),
    source,
    s,
    title,
    legend,
    captionLines(title, context, new Date()),
  ) as HTMLCanvasElement;
  const blob = await new Promise<Blob | null>((resolve) => canvas.toBlob(resolve, "image/png"));
  if (!blob) throw new Error("The browser could not make the PNG.");
  const name = [fileSlug(title), suffix].filter(Boolean).join("-");
  downloadBlob(`${name}.png`, blob);
}
