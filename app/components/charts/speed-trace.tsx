import { memo, useEffect, useMemo, useState } from "react";
import type uPlot from "uplot";
import { rpmRangeText, rpmText, secondsNumber, secondsText } from "~/lib/domain/format";
import { eventNames, type ChartData } from "~/lib/domain/chart-data";
import { extent } from "./chart-math";
import { ChartFrame } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import { commentLegend, type LegendEntry } from "./legend";
import { COLOURS } from "./palette";
import { FramePlot, usePlotPng } from "./frame-plot";
import type { PlotOptions } from "./plot";
import {
  cursor,
  drawEventPennants,
  drawEventTints,
  drawFilterSpans,
  drawXBands,
  drawXMarkers,
  fromZeroWithHeadroom,
  lineSeries,
  xAxis,
  yAxis,
} from "./plot-kit";
import type { ChartMarker } from "./types";
import { useTimeMarkers } from "./use-stable";

const TITLE = "Speed trace";
export const SPEED_TRACE_HEIGHT = 260;

const SEGMENT_NAMES: Record<ChartData["segments"][number]["kind"], string> = {
  start: "start",
  idle: "idle",
  steady: "steady",
  "run-up": "run-up",
  "coast-down": "coast-down",
};

/** Crank and gearbox-input speed against time, operating segments as labelled bands. */
export const SpeedTrace = memo(function SpeedTrace({
  charts,
  markers,
  fileSuffix,
}: {
  charts: ChartData | null;
  markers?: ChartMarker[];
  fileSuffix?: string;
}) {
  const trace = charts?.speedTrace ?? null;
  const { onPlot, png } = usePlotPng();
  const [readout, setReadout] = useState("");
  const timeMarkers = useTimeMarkers(markers);
  const events = useMemo(() => {
    const list = charts?.events ?? [];
    const names = eventNames(list);
    return list.map((e, i) => ({ ...e, label: names[i]! }));
  }, [charts]);
  const spans = useMemo(() => charts?.transient?.spans ?? [], [charts]);

  const data = useMemo<uPlot.AlignedData>(
    () => (trace ? [trace.timeS, trace.crankRpm, trace.gearboxRpm] : [[]]),
    [trace],
  );

  const options = useMemo<PlotOptions | null>(() => {
    if (!charts || !trace) return null;
    const bands = charts.segments.map((s, i) => ({
      from: s.startS,
      to: s.endS,
      fill: i % 2 ? COLOURS.bandB : COLOURS.bandA,
      label: `${SEGMENT_NAMES[s.kind]} · ${rpmText(s.meanRpm)}`,
    }));
    return {
      scales: { x: { time: false }, y: { range: fromZeroWithHeadroom } },
      axes: [xAxis("Time, s"), yAxis("Speed, rpm")],
      series: [
        { label: "Time, s" },
        lineSeries("Crank", COLOURS.crank),
        lineSeries("Gearbox input", COLOURS.gearbox, { dash: [6, 3] }),
      ],
      legend: { show: false },
      cursor: cursor(),
      hooks: {
        drawClear: [(u) => drawXBands(u, bands, false), (u) => drawEventTints(u, events)],
        draw: [
          (u) => drawXBands(u, bands, true),
          (u) => drawEventPennants(u, events),
          (u) => drawFilterSpans(u, spans),
          (u) => drawXMarkers(u, timeMarkers),
        ],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            const t = trace.timeS[i]!;
            const seg = charts.segments.find((s) => t >= s.startS && t < s.endS);
            const event = events.find((e) => t >= e.startS && t <= e.endS);
            setReadout(
              `${secondsText(t)} · crank ${rpmText(trace.crankRpm[i])} · gearbox input ${rpmText(trace.gearboxRpm[i])}${seg ? ` · ${SEGMENT_NAMES[seg.kind]}` : ""}${event ? ` · ${event.label.toLowerCase()} (engine ${event.kind})` : ""}`,
            );
          },
        ],
      },
    };
  }, [charts, trace, timeMarkers, events, spans]);

  // A new chart (order, unit, data) or row starts without a stale reading.
  useEffect(() => setReadout(""), [options]);

  const legend: LegendEntry[] = [
    { kind: "line", label: "Crank", colour: COLOURS.crank },
    { kind: "line", label: "Gearbox input", colour: COLOURS.gearbox, dash: [6, 3] },
    { kind: "area", label: "Operating segment (labelled)", colour: COLOURS.bandA },
    ...(events.length
      ? [
          {
            kind: "point" as const,
            shape: "pennant" as const,
            label: "Engine start or stop (flag points into the event; tinted while it lasts)",
            colour: COLOURS.event,
          },
        ]
      : []),
    ...(spans.length
      ? [
          {
            kind: "line" as const,
            label: "Measured by the order filter (bar at the foot)",
            colour: COLOURS.event,
            width: 4,
          },
        ]
      : []),
    ...commentLegend(timeMarkers),
  ];

  const status = !charts ? "loading" : trace && trace.timeS.length ? "ready" : "empty";
  const range = trace ? extent(trace.crankRpm) : null;
  const summary =
    charts && trace
      ? `Speed over ${secondsText(charts.durationS)}: crank ${rpmRangeText(range?.[0], range?.[1])}. Segments: ${charts.segments
          .map(
            (s) =>
              `${SEGMENT_NAMES[s.kind]} ${secondsNumber(s.startS)}–${secondsText(s.endS)} at ${rpmText(s.meanRpm)}`,
          )
          .join("; ")}.${
          events.length
            ? ` Engine starts and stops: ${events
                .map((e) => `${e.label} ${secondsNumber(e.startS)}–${secondsText(e.endS)}`)
                .join("; ")}.`
            : ""
        }`
      : undefined;

  return (
    <ChartFrame
      chart="speed-trace"
      title={TITLE}
      height={SPEED_TRACE_HEIGHT}
      status={status}
      emptyMessage="This analysis was made before speed traces were stored: re-analyse the drive log to draw the speed trace."
      legend={legend}
      readout={
        readout || "Point at the chart, or focus it and use the arrow keys, to read the speeds."
      }
      summary={summary}
      onCsv={() =>
        trace &&
        downloadCsv(
          TITLE,
          buildCsv(
            ["time (s)", "crank speed (rpm)", "gearbox input speed (rpm)"],
            columnsToRows([trace.timeS, trace.crankRpm, trace.gearboxRpm]),
          ),
          fileSuffix,
        )
      }
      onPng={png(TITLE, legend, fileSuffix)}
    >
      {(summaryId) => (
        <FramePlot
          height={SPEED_TRACE_HEIGHT}
          options={options}
          data={data}
          label={`${TITLE}: crank and gearbox-input speed in rpm against time in s. Use the left and right arrow keys to move the time cursor.`}
          describedBy={summaryId}
          onPlot={onPlot}
        />
      )}
    </ChartFrame>
  );
});
