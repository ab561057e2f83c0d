/** The rattle check's first chart: |α| at the gearbox input in the idle segments, against the limit. */
import { memo, useEffect, useMemo, useState } from "react";
import type uPlot from "uplot";
import { radS2Text, rpmText, secondsNumber, secondsText } from "~/lib/domain/format";
import type { ChartData } from "~/lib/domain/chart-data";
import { ChartFrame } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import { FramePlot, usePlotPng } from "./frame-plot";
import { commentLegend, type LegendEntry } from "./legend";
import { COLOURS } from "./palette";
import type { PlotOptions } from "./plot";
import {
  cursor,
  drawXBands,
  drawXMarkers,
  drawYLine,
  lineSeries,
  rangeWith,
  xAxis,
  yAxis,
} from "./plot-kit";
import type { ChartMarker } from "./types";
import { useTimeMarkers } from "./use-stable";

export const RATTLE_CHART_HEIGHT = 260;
export const NO_IDLE = "This drive log has no idle segment, so there is no rattle check to chart.";

const ACCEL_TITLE = "Angular acceleration at the gearbox input";

export const AccelChart = memo(function AccelChart({
  charts,
  markers,
  syncKey,
  fileSuffix,
}: {
  charts: ChartData | null;
  markers?: ChartMarker[];
  syncKey: string;
  fileSuffix?: string;
}) {
  const idle = charts?.idle ?? null;
  const trace = idle?.accelTrace ?? null;
  const [readout, setReadout] = useState("");
  const { onPlot, png } = usePlotPng();
  const timeMarkers = useTimeMarkers(markers);
  const data = useMemo<uPlot.AlignedData>(
    () => (trace ? [trace.timeS, trace.radS2] : [[]]),
    [trace],
  );

  const options = useMemo<PlotOptions | null>(() => {
    if (!idle || !trace) return null;
    const spans = idle.spans.map((s) => ({
      from: s.startS,
      to: s.endS,
      fill: COLOURS.failFill,
      label: "above the limit",
    }));
    return {
      scales: { x: { time: false }, y: { range: rangeWith(0, idle.limitRadS2) } },
      axes: [xAxis("Time, s"), yAxis("|α|, rad/s²", { size: 56 })],
      series: [
        { label: "Time, s" },
        lineSeries("|α| gearbox input", COLOURS.gearbox, { width: 1.5 }),
      ],
      legend: { show: false },
      cursor: cursor(syncKey),
      hooks: {
        drawClear: [(u) => drawXBands(u, spans, false)],
        draw: [
          (u) => drawXBands(u, spans, true),
          (u) =>
            drawYLine(u, idle.limitRadS2, COLOURS.fail, {
              dash: [6, 3],
              width: 1.5,
              label: `limit ${radS2Text(idle.limitRadS2)}`,
            }),
          (u) => drawXMarkers(u, timeMarkers),
        ],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            const v = trace.radS2[i];
            setReadout(
              v == null
                ? `${secondsText(trace.timeS[i])} · between idle segments`
                : `${secondsText(trace.timeS[i])} · |α| ${radS2Text(v)} · limit ${radS2Text(idle.limitRadS2)}${v > idle.limitRadS2 ? " · above the limit" : ""}`,
            );
          },
        ],
      },
    };
  }, [idle, trace, syncKey, timeMarkers]);

  useEffect(() => setReadout(""), [options]);

  const legend: LegendEntry[] = [
    { kind: "line", label: "|α| at the gearbox input", colour: COLOURS.gearbox, width: 1.5 },
    { kind: "line", label: "Rattle limit", colour: COLOURS.fail, dash: [6, 3], width: 1.5 },
    ...(idle?.spans.length
      ? [
          {
            kind: "area" as const,
            label: "Above the limit",
            colour: COLOURS.failFill,
            border: COLOURS.fail,
          },
        ]
      : []),
    ...commentLegend(timeMarkers),
  ];
  const status = !charts ? "loading" : trace && trace.timeS.length ? "ready" : "empty";
  const summary = idle
    ? `In ${secondsText(idle.idleDurationS)} of idle at ${rpmText(idle.meanRpm)} the gearbox-input angular acceleration at the firing order is ${radS2Text(idle.gearboxAngAccelRadS2)}, its peak ${radS2Text(idle.gearboxAngAccelPeakRadS2)}, against a limit of ${radS2Text(idle.limitRadS2)} (${idle.verdict === "ok" ? "within the limit" : "over the limit"}). ${idle.spans.length} span${idle.spans.length === 1 ? "" : "s"} above the limit${idle.spans.length ? `: ${idle.spans.map((s) => `${secondsNumber(s.startS)}–${secondsText(s.endS)}, peak ${radS2Text(s.peakRadS2)}`).join("; ")}` : ""}.`
    : undefined;

  return (
    <ChartFrame
      chart="rattle-accel"
      title={ACCEL_TITLE}
      height={RATTLE_CHART_HEIGHT}
      status={status}
      note="Time-domain |α| in the idle segments (bucket maxima); gaps separate idle segments."
      emptyMessage={
        charts && !idle
          ? NO_IDLE
          : "This analysis was made before acceleration traces were stored: re-analyse the drive log to draw it."
      }
      legend={legend}
      readout={readout || "Point at the chart to read the angular acceleration."}
      summary={summary}
      onCsv={() =>
        trace &&
        downloadCsv(
          ACCEL_TITLE,
          buildCsv(
            ["time (s)", "gearbox input angular acceleration |α| (rad/s²)"],
            columnsToRows([trace.timeS, trace.radS2]),
          ),
          fileSuffix,
        )
      }
      onPng={png(ACCEL_TITLE, legend, fileSuffix)}
    >
      {(summaryId) => (
        <FramePlot
          height={RATTLE_CHART_HEIGHT}
          options={options}
          data={data}
          label={`${ACCEL_TITLE}: |α| in rad/s² against time in s, with the rattle limit`}
          describedBy={summaryId}
          onPlot={onPlot}
        />
      )}
    </ChartFrame>
  );
});
