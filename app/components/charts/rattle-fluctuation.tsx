/** The rattle check's second chart: the firing-order amplitude at crank and gearbox input over idle time. */
import { memo, useEffect, useMemo, useState } from "react";
import type uPlot from "uplot";
import { amplitudeNumber, amplitudeText, orderNumber, secondsText } from "~/lib/domain/format";
import type { ChartData } from "~/lib/domain/chart-data";
import { convertSpeed, SPEED_UNITS, type SpeedUnit } from "~/lib/domain/chart-units";
import { extent, withGaps } from "./chart-math";
import { ChartFrame, Segmented } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import { FramePlot, usePlotPng } from "./frame-plot";
import { commentLegend, type LegendEntry } from "./legend";
import { COLOURS } from "./palette";
import type { PlotOptions } from "./plot";
import { cursor, drawXMarkers, fromZero, lineSeries, xAxis, yAxis } from "./plot-kit";
import { NO_IDLE, RATTLE_CHART_HEIGHT } from "./rattle-accel";
import type { ChartMarker } from "./types";
import { useTimeMarkers } from "./use-stable";

const FLUCTUATION_TITLE = "Firing-order fluctuation";

export const FluctuationChart = memo(function FluctuationChart({
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
