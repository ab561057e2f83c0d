import { countText } from "~/lib/base/plural";
import { memo, useEffect, useMemo, useRef, useState } from "react";
import type uPlot from "uplot";
import { amplitudeText, orderNumber, rpmRangeText, rpmText } from "~/lib/domain/format";
import type { ChartData } from "~/lib/domain/chart-data";
import {
  AMPLITUDE_UNITS,
  amplitudeAxisLabel,
  convertAmplitude,
  type AmplitudeUnit,
} from "~/lib/domain/chart-units";
import { ChartFrame, Segmented, SelectControl } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import { commentLegend, type LegendEntry } from "./legend";
import { COLOURS } from "./palette";
import { FramePlot, usePlotPng } from "./frame-plot";
import type { PlotOptions } from "./plot";
import { cursor, drawXMarkers, fromZero, lineSeries, xAxis, xRangeAround, yAxis } from "./plot-kit";
import type { ChartMarker } from "./types";
import { useRpmMarkers } from "./use-stable";

const TITLE = "Order curves";
export const ENGINE_SPEED_CHART_HEIGHT = 300;

export function orderLabel(order: number, firingOrder: number): string {
  return order === firingOrder ? `${order} (firing order)` : String(order);
}

/** Amplitude of one tracked order at crank and gearbox input against engine speed. */
export const OrderCurves = memo(function OrderCurves({
  charts,
  syncKey,
  onCursorRpm,
  markers,
  fileSuffix,
}: {
  charts: ChartData | null;
  syncKey?: string;
  onCursorRpm?: (rpm: number) => void;
  markers?: ChartMarker[];
  fileSuffix?: string;
}) {
  const [chosen, setChosen] = useState<number | null>(null);
  const [unit, setUnit] = useState<AmplitudeUnit>("rpm");
  const [readout, setReadout] = useState("");
  const { onPlot, png } = usePlotPng();
  const report = useRef(onCursorRpm);
  report.current = onCursorRpm;
  const rpmMarkers = useRpmMarkers(markers);

  const order = chosen ?? charts?.firingOrder ?? 0;
  const curve = charts?.orderCurves.find((c) => c.order === order) ?? null;

  const data = useMemo<uPlot.AlignedData>(() => {
    if (!curve) return [[]];
    const conv = (a: number[]) => a.map((v, i) => convertAmplitude(v, unit, order, curve.rpm[i]!));
    return [curve.rpm, conv(curve.crankRpm), conv(curve.gearboxRpm)];
  }, [curve, unit, order]);

  const options = useMemo<PlotOptions | null>(() => {
    if (!curve) return null;
    const dot = curve.rpm.length < 4 ? 8 : 4;
    return {
      scales: {
        x: { time: false, range: xRangeAround(5 * (charts?.binRpm ?? 50)) },
        y: { range: fromZero },
      },
      axes: [xAxis("Engine speed, rpm"), yAxis(amplitudeAxisLabel(unit), { size: 56 })],
      series: [
        { label: "Engine speed, rpm" },
        lineSeries("Crank", COLOURS.crank, { points: { show: true, size: dot } }),
        lineSeries("Gearbox input", COLOURS.gearbox, {
          dash: [6, 3],
          points: { show: true, size: dot },
        }),
      ],
      legend: { show: false },
      cursor: cursor(syncKey),
      hooks: {
        draw: [(u) => drawXMarkers(u, rpmMarkers)],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            const rpm = u.data[0][i]!;
            report.current?.(rpm);
            const c = u.data[1]![i];
            const g = u.data[2]![i];
            setReadout(
              `${rpmText(rpm)} · order ${orderNumber(order)} · crank ${amplitudeText(c, unit)} · gearbox input ${amplitudeText(g, unit)}`,
            );
          },
        ],
      },
    };
  }, [curve, unit, order, syncKey, rpmMarkers, charts?.binRpm]);

  // A new chart (order, unit, data) or row starts without a stale reading.
  useEffect(() => setReadout(""), [options]);

  const legend: LegendEntry[] = [
    { kind: "line", label: `Crank, order ${order}`, colour: COLOURS.crank },
    { kind: "line", label: `Gearbox input, order ${order}`, colour: COLOURS.gearbox, dash: [6, 3] },
    ...commentLegend(rpmMarkers),
  ];

  const status = !charts ? "loading" : curve && curve.rpm.length ? "ready" : "empty";
  const summary = curve && curve.rpm.length ? summarise(curve, order, unit, data) : undefined;

  function csv() {
    if (!curve) return;
    const header = [
      "engine speed (rpm)",
      `crank amplitude order ${order} (rpm)`,
      `gearbox input amplitude order ${order} (rpm)`,
    ];
    const cols: (number | null | undefined)[][] = [curve.rpm, curve.crankRpm, curve.gearboxRpm];
    if (unit !== "rpm") {
      header.push(
        `crank amplitude order ${order} (${unit})`,
        `gearbox input amplitude order ${order} (${unit})`,
      );
      cols.push(data[1] as number[], data[2] as number[]);
    }
    downloadCsv(
      TITLE,
      buildCsv(header, columnsToRows(cols)),
      [fileSuffix, `order-${order}`].filter(Boolean).join("-"),
    );
  }

  return (
    <ChartFrame
      chart="order-curves"
      title={TITLE}
      height={ENGINE_SPEED_CHART_HEIGHT}
      status={status}
      attrs={{ "data-order": order, "data-unit": unit }}
      emptyMessage="No engine-speed bin has enough blocks for an order curve. A longer drive log, or re-analysing with a wider engine-speed bin, gives one."
      controls={
        <>
          <SelectControl
            label="Order"
            value={String(order)}
            disabled={!charts}
            options={(charts?.orderCurves ?? [{ order }]).map((c) => ({
              value: String(c.order),
              label: orderLabel(c.order, charts?.firingOrder ?? order),
            }))}
            onChange={(v) => setChosen(Number(v))}
          />
          <Segmented
            legend="Unit"
            value={unit}
            disabled={!charts}
            options={AMPLITUDE_UNITS.map((u) => ({ value: u, label: u }))}
            onChange={setUnit}
          />
        </>
      }
      legend={legend}
      readout={
        readout || "Point at the chart, or focus it and use the arrow keys, to read the amplitudes."
      }
      summary={summary}
      onCsv={csv}
      onPng={png(`${TITLE}, order ${order}`, legend, fileSuffix)}
    >
      {(summaryId) => (
        <FramePlot
          height={ENGINE_SPEED_CHART_HEIGHT}
          options={options}
          data={data}
          label={`${TITLE}: order ${order} amplitude in ${unit} at crank and gearbox input against engine speed in rpm. Use the left and right arrow keys to move the engine-speed cursor.`}
          describedBy={summaryId}
          onPlot={onPlot}
        />
      )}
    </ChartFrame>
  );
});

function summarise(
  curve: ChartData["orderCurves"][number],
  order: number,
  unit: AmplitudeUnit,
  data: uPlot.AlignedData,
): string {
  const peak = (ys: ArrayLike<number | null | undefined>) => {
    let best = 0;
    for (let i = 1; i < ys.length; i++)
      if ((ys[i] ?? -Infinity) > (ys[best] ?? -Infinity)) best = i;
    return best;
  };
  const c = peak(data[1]!);
  const g = peak(data[2]!);
  return `Order ${orderNumber(order)} over ${rpmRangeText(curve.rpm[0], curve.rpm[curve.rpm.length - 1])}, ${countText(curve.rpm.length, "point")}. Largest crank amplitude ${amplitudeText(data[1]![c], unit)} at ${rpmText(curve.rpm[c])}; largest gearbox-input amplitude ${amplitudeText(data[2]![g], unit)} at ${rpmText(curve.rpm[g])}.`;
}
