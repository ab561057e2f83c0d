/**
 * What every uPlot chart inside a ChartFrame shares: the plot (keyboard-readable, described by
 * the frame's summary, drawn once its options are there) and the PNG export of what it drew.
 */
import { useRef } from "react";
import type uPlot from "uplot";
import { downloadPng } from "./download";
import { useExportContext } from "./export-context";
import type { LegendEntry } from "./legend";
import { Plot, type PlotOptions } from "./plot";

/** `onPlot` for FramePlot, and `png(title, legend, fileSuffix)` for ChartFrame's onPng. */
export function usePlotPng() {
  const exportContext = useExportContext();
  const plot = useRef<uPlot | null>(null);
  return {
    onPlot: (u: uPlot | null) => {
      plot.current = u;
    },
    png: (title: string, legend: LegendEntry[], fileSuffix?: string) => () => {
      if (plot.current)
        void downloadPng(title, plot.current.ctx.canvas, legend, fileSuffix, exportContext);
    },
  };
}

/** A keyboard-readable Plot, or nothing while there are no options to draw it with. */
export function FramePlot({
  options,
  ...props
}: Omit<Parameters<typeof Plot>[0], "options" | "keyboard"> & { options: PlotOptions | null }) {
  return options ? <Plot {...props} options={options} keyboard /> : null;
}
