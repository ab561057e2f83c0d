import { memo, useEffect, useId, useMemo, useState } from "react";
import type uPlot from "uplot";
import {
  amplitudeNumber,
  amplitudeText,
  orderNumber,
  radS2Text,
  rpmText,
  secondsNumber,
  secondsText,
} from "~/lib/domain/format";
import type { ChartData } from "~/lib/domain/chart-data";
import { convertSpeed, SPEED_UNITS, type SpeedUnit } from "~/lib/domain/chart-units";
import { extent, withGaps } from "./chart-math";
import { ChartFrame, ChartsError, Segmented } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import { ChartExportContext } from "./export-context";
import { commentLegend, type LegendEntry } from "./legend";
import { COLOURS } from "./palette";
import { FramePlot, usePlotPng } from "./frame-plot";
import type { PlotOptions } from "./plot";
import {
  cursor,
  drawXBands,
  drawXMarkers,
  drawYLine,
  fromZero,
  lineSeries,
  rangeWith,
  xAxis,
  yAxis,
} from "./plot-kit";
import { useChartsQuery } from "./queries";
import type { ChartMarker, ExportContext } from "./types";
import { useTimeMarkers } from "./use-stable";

export const RATTLE_CHART_HEIGHT = 260;
const NO_IDLE = "This drive log has no idle segment, so there is no rattle check to chart.";

/** The rattle check's charts: |α| at the gearbox input against its limit, and the firing-order fluctuation. */
export function RattleCharts({
  chartsUrl,
  markers,
  analysisVersion,
  exportContext,
}: {
  chartsUrl: string;
  markers?: ChartMarker[];
  /** As for DriveLogCharts: the latest analysis version the page knows of. */
  analysisVersion?: number;
  /** As for DriveLogCharts: the vehicle and drive log named in the PNG exports' caption. */
  exportContext?: Pick<ExportContext, "vehicle" | "driveLog">;
}) {
  const query = useChartsQuery(chartsUrl, analysisVersion);
  const syncKey = `twistlog-time-${useId()}`;
  const charts = query.data?.charts ?? null;
  const suffix = query.data ? `log-${query.data.logId}-v${query.data.analysis.version}` : undefined;
  const exportValue = { ...exportContext, analysis: query.data?.analysis };
  if (query.isError)
    return (
      <section aria-label="Rattle check charts" data-charts="rattle" data-status="error">
        <ChartsError error={query.error} onRetry={() => void query.refetch()} />
      </section>
    );
  return (
    <section
      aria-label="Rattle check charts"
      data-charts="rattle"
      data-status={charts ? "ready" : "loading"}
      className="space-y-6"
    >
      <ChartExportContext.Provider value={exportValue}>
        <AccelChart charts={charts} markers={markers} syncKey={syncKey} fileSuffix={suffix} />
        <FluctuationChart charts={charts} markers={markers} syncKey={syncKey} fileSuffix={suffix} />
      </ChartExportContext.Provider>
    </section>
  );
}

const ACCEL_TITLE = "Angular acceleration at the gearbox input";

const AccelChart = memo(function AccelChart({
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

const FLUCTUATION_TITLE = "Firing-order fluctuation";

const FluctuationChart = memo(function FluctuationChart({
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
  const trace = idle?.firingOrderTrace ?? null;
  const [unit, setUnit] = useState<SpeedUnit>("rpm");
  const [readout, setReadout] = useState("");
  const { onPlot, png } = usePlotPng();
  const timeMarkers = useTimeMarkers(markers);

  const data = useMemo<uPlot.AlignedData>(() => {
    if (!trace) return [[]];
    const conv = (a: number[]) => a.map((v) => convertSpeed(v, unit));
    const gapped = withGaps(trace.timeS, [conv(trace.crankRpm), conv(trace.gearboxRpm)]);
    return [gapped.x, gapped.ys[0]!, gapped.ys[1]!];
  }, [trace, unit]);

  const options = useMemo<PlotOptions | null>(() => {
    if (!trace || !charts) return null;
    return {
      scales: { x: { time: false }, y: { range: fromZero } },
      axes: [
        xAxis("Time, s"),
        yAxis(`Order ${charts.firingOrder} amplitude, ${unit}`, { size: 56 }),
      ],
      series: [
        { label: "Time, s" },
        lineSeries("Crank", COLOURS.crank, { points: { show: true, size: 4 } }),
        lineSeries("Gearbox input", COLOURS.gearbox, {
          dash: [6, 3],
          points: { show: true, size: 4 },
        }),
      ],
      legend: { show: false },
      cursor: cursor(syncKey),
      hooks: {
        draw: [(u) => drawXMarkers(u, timeMarkers)],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null || u.data[1]![i] == null) return;
            setReadout(
              `${secondsText(u.data[0][i])} · crank ${amplitudeText(u.data[1]![i], unit)} · gearbox input ${amplitudeText(u.data[2]![i], unit)} (0-peak, order ${orderNumber(charts.firingOrder)})`,
            );
          },
        ],
      },
    };
  }, [trace, charts, unit, syncKey, timeMarkers]);

  useEffect(() => setReadout(""), [options]);

  const legend: LegendEntry[] = [
    { kind: "line", label: "Crank", colour: COLOURS.crank },
    { kind: "line", label: "Gearbox input", colour: COLOURS.gearbox, dash: [6, 3] },
    ...commentLegend(timeMarkers),
  ];
  const status = !charts ? "loading" : trace && trace.timeS.length ? "ready" : "empty";
  const c = trace ? extent(trace.crankRpm) : null;
  const g = trace ? extent(trace.gearboxRpm) : null;
  const summary =
    trace && charts && trace.timeS.length
      ? `Firing-order (${charts.firingOrder}) amplitude, 0-peak, in the idle segments: crank ${amplitudeNumber(c?.[0])} to ${amplitudeText(c?.[1], "rpm")}, gearbox input ${amplitudeNumber(g?.[0])} to ${amplitudeText(g?.[1], "rpm")}.`
      : undefined;

  function csv() {
    if (!trace) return;
    const header = [
      "time (s)",
      "crank firing-order amplitude (rpm)",
      "gearbox input firing-order amplitude (rpm)",
    ];
    const cols: number[][] = [trace.timeS, trace.crankRpm, trace.gearboxRpm];
    if (unit !== "rpm") {
      header.push(
        `crank firing-order amplitude (${unit})`,
        `gearbox input firing-order amplitude (${unit})`,
      );
      cols.push(
        trace.crankRpm.map((v) => convertSpeed(v, unit)),
        trace.gearboxRpm.map((v) => convertSpeed(v, unit)),
      );
    }
    downloadCsv(FLUCTUATION_TITLE, buildCsv(header, columnsToRows(cols)), fileSuffix);
  }

  return (
    <ChartFrame
      chart="rattle-fluctuation"
      title={FLUCTUATION_TITLE}
      height={RATTLE_CHART_HEIGHT}
      status={status}
      attrs={{ "data-unit": unit }}
      controls={
        <Segmented
          legend="Unit"
          value={unit}
          disabled={!trace}
          options={SPEED_UNITS.map((u) => ({ value: u, label: u }))}
          onChange={setUnit}
        />
      }
      emptyMessage={
        charts && !idle ? NO_IDLE : "No order-tracked blocks fall in the idle segments."
      }
      legend={legend}
      readout={readout || "Point at the chart to read the fluctuation."}
      summary={summary}
      onCsv={csv}
      onPng={png(FLUCTUATION_TITLE, legend, fileSuffix)}
    >
      {(summaryId) => (
        <FramePlot
          height={RATTLE_CHART_HEIGHT}
          options={options}
          data={data}
          label={`${FLUCTUATION_TITLE}: firing-order amplitude in ${unit} at crank and gearbox input against time in s`}
          describedBy={summaryId}
          onPlot={onPlot}
        />
      )}
    </ChartFrame>
  );
});
