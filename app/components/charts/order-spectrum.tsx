import { memo, useEffect, useMemo, useRef, useState } from "react";
import type uPlot from "uplot";
import { amplitudeText, orderNumber, rpmText } from "~/lib/domain/format";
import type { ChartData } from "~/lib/domain/chart-data";
import { nearestIndex } from "./chart-math";
import { ChartFrame } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import type { LegendEntry } from "./legend";
import { COLOURS, FONT_FAMILY } from "./palette";
import { FramePlot, usePlotPng } from "./frame-plot";
import type { PlotOptions } from "./plot";
import { cursor, fromZero, lineSeries, px, xAxis, yAxis } from "./plot-kit";

export const ORDER_SPECTRUM_HEIGHT = 260;

/**
 * The order-map row shown when the cursor has not moved yet: the damper resonance if the log
 * has one, otherwise the row where the gearbox input's firing-order amplitude is largest.
 */
export function defaultSpectrumRpm(charts: ChartData): number | null {
  const map = charts.orderMap;
  if (!map.rpm.length) return null;
  if (charts.resonance) return charts.resonance.rpm;
  const k = Math.round(charts.firingOrder / map.orderStep);
  let best = 0;
  map.gearboxRpm.forEach((row, i) => {
    if ((row[k] ?? 0) > (map.gearboxRpm[best]![k] ?? 0)) best = i;
  });
  return map.rpm[best]!;
}

/** Amplitude against order, both sides, for the order-map row nearest the cursor's engine speed. */
export const OrderSpectrum = memo(function OrderSpectrum({
  charts,
  cursorRpm,
  fileSuffix,
}: {
  charts: ChartData | null;
  cursorRpm: number | null;
  fileSuffix?: string;
}) {
  const [readout, setReadout] = useState("");
  const { onPlot, png } = usePlotPng();
  const map = charts?.orderMap ?? null;
  const want = cursorRpm ?? (charts ? defaultSpectrumRpm(charts) : null);
  const row = map && want !== null ? nearestIndex(map.rpm, want) : -1;
  const rowRpm = map && row >= 0 ? map.rpm[row]! : null;
  const title = rowRpm !== null ? `Order spectrum at ${rpmText(rowRpm)}` : "Order spectrum";

  const orders = useMemo(
    () => (map ? Array.from({ length: map.orderCount }, (_, k) => k * map.orderStep) : []),
    [map],
  );
  const data = useMemo<uPlot.AlignedData>(
    () => (map && row >= 0 ? [orders, map.crankRpm[row]!, map.gearboxRpm[row]!] : [[]]),
    [map, row, orders],
  );
  const rowRef = useRef({ rowRpm });
  rowRef.current = { rowRpm };

  const options = useMemo<PlotOptions | null>(() => {
    if (!charts || !map || !map.rpm.length) return null;
    return {
      scales: { x: { time: false }, y: { range: fromZero } },
      axes: [xAxis("Order"), yAxis("Amplitude, rpm")],
      series: [
        { label: "Order" },
        lineSeries("Crank", COLOURS.crank, { width: 1.5 }),
        lineSeries("Gearbox input", COLOURS.gearbox, { width: 1.5, dash: [6, 3] }),
      ],
      legend: { show: false },
      cursor: cursor(),
      hooks: {
        draw: [(u) => drawFiringOrder(u, charts.firingOrder)],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            setReadout(
              `${rpmText(rowRef.current.rowRpm)} · order ${orderNumber(u.data[0][i])} · crank ${amplitudeText(u.data[1]![i], "rpm")} · gearbox input ${amplitudeText(u.data[2]![i], "rpm")}`,
            );
          },
        ],
      },
    };
  }, [charts, map]);

  // A new chart (order, unit, data) or row starts without a stale reading.
  useEffect(() => setReadout(""), [options, row]);

  const legend: LegendEntry[] = [
    { kind: "line", label: "Crank", colour: COLOURS.crank, width: 1.5 },
    { kind: "line", label: "Gearbox input", colour: COLOURS.gearbox, width: 1.5, dash: [6, 3] },
    { kind: "line", label: "Firing order", colour: COLOURS.marker, dash: [2, 3], width: 1 },
  ];

  const status = !charts ? "loading" : map && map.rpm.length && map.orderCount ? "ready" : "empty";
  let summary: string | undefined;
  if (status === "ready" && map && charts) {
    const k = Math.round(charts.firingOrder / map.orderStep);
    summary = `Order spectrum of the order-map row at ${rpmText(rowRpm)} (${rpmText(map.rowRpm)} wide), orders 0 to ${orderNumber(orders[orders.length - 1])}. At the firing order ${orderNumber(charts.firingOrder)}: crank ${amplitudeText(map.crankRpm[row]![k], "rpm")}, gearbox input ${amplitudeText(map.gearboxRpm[row]![k], "rpm")}.`;
  }

  return (
    <ChartFrame
      chart="order-spectrum"
      title={title}
      exportName="Order spectrum"
      height={ORDER_SPECTRUM_HEIGHT}
      status={status}
      attrs={{ "data-rpm": rowRpm ?? undefined }}
      note="Follows the engine-speed cursor of the order curves and the isolation curve (the nearest order-map row)."
      emptyMessage="No order-map rows to take a spectrum from: the drive log may be too short or too slow."
      legend={legend}
      readout={
        readout ||
        "Point at the chart, or focus it and use the arrow keys, to read the amplitudes by order."
      }
      summary={summary}
      onCsv={() =>
        map &&
        row >= 0 &&
        downloadCsv(
          title,
          buildCsv(
            [
              "order",
              `crank amplitude at ${rowRpm} rpm (rpm)`,
              `gearbox input amplitude at ${rowRpm} rpm (rpm)`,
            ],
            columnsToRows([orders, map.crankRpm[row]!, map.gearboxRpm[row]!]),
          ),
          fileSuffix,
        )
      }
      onPng={png(title, legend, fileSuffix)}
    >
      {(summaryId) => (
        <FramePlot
          height={ORDER_SPECTRUM_HEIGHT}
          options={options}
          data={data}
          label={`${title}: amplitude in rpm against order, crank and gearbox input. Use the left and right arrow keys to move the order cursor.`}
          describedBy={summaryId}
          onPlot={onPlot}
        />
      )}
    </ChartFrame>
  );
});

function drawFiringOrder(u: uPlot, order: number) {
  const { ctx, bbox } = u;
  const s = px(u);
  const x = u.valToPos(order, "x", true);
  ctx.save();
  ctx.strokeStyle = COLOURS.marker;
  ctx.lineWidth = s;
  ctx.setLineDash([2 * s, 3 * s]);
  ctx.beginPath();
  ctx.moveTo(x, bbox.top);
  ctx.lineTo(x, bbox.top + bbox.height);
  ctx.stroke();
  ctx.fillStyle = COLOURS.marker;
  ctx.font = `${11 * s}px ${FONT_FAMILY}`;
  ctx.textAlign = "left";
  ctx.textBaseline = "top";
  ctx.fillText(`firing order ${orderNumber(order)}`, x + 4 * s, bbox.top + 4 * s);
  ctx.restore();
}
