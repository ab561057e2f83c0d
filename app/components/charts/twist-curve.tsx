import { countText } from "~/lib/base/plural";
import { memo, useEffect, useMemo, useRef, useState } from "react";
import type uPlot from "uplot";
import type { ChartData } from "~/lib/domain/chart-data";
import { degreesText, fixed, rpmRangeText, rpmText } from "~/lib/domain/format";
import { ChartFrame } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import type { LegendEntry } from "./legend";
import { ENGINE_SPEED_CHART_HEIGHT } from "./order-curves";
import { COLOURS } from "./palette";
import { FramePlot, usePlotPng } from "./frame-plot";
import type { PlotOptions } from "./plot";
import {
  cursor,
  drawFilterMarks,
  fromZero,
  lineSeries,
  xAxis,
  xRangeAround,
  yAxis,
} from "./plot-kit";

const TITLE = "Twist curve";

/**
 * The firing-order twist between the damper's primary and secondary side (degrees, 0-peak)
 * against engine speed. It shares the engine-speed cursor with the order and isolation curves.
 */
export const TwistCurve = memo(function TwistCurve({
  charts,
  syncKey,
  onCursorRpm,
  fileSuffix,
}: {
  charts: ChartData | null;
  syncKey?: string;
  onCursorRpm?: (rpm: number) => void;
  fileSuffix?: string;
}) {
  const [readout, setReadout] = useState("");
  const { onPlot, png } = usePlotPng();
  const report = useRef(onCursorRpm);
  report.current = onCursorRpm;
  const twist = charts?.twist ?? null;

  const data = useMemo<uPlot.AlignedData>(() => (twist ? [twist.rpm, twist.deg] : [[]]), [twist]);

  const options = useMemo<PlotOptions | null>(() => {
    if (!twist || !charts) return null;
    const filtered = twist.method.map((m) => m === "filter");
    return {
      scales: {
        x: { time: false, range: xRangeAround(5 * charts.binRpm) },
        y: { range: fromZero },
      },
      axes: [xAxis("Engine speed, rpm"), yAxis(`Twist at order ${charts.firingOrder}, ° (0-peak)`)],
      series: [
        { label: "Engine speed, rpm" },
        lineSeries("Twist", COLOURS.twist, {
          points: { show: true, size: twist.rpm.length < 4 ? 8 : 4 },
        }),
      ],
      legend: { show: false },
      cursor: cursor(syncKey),
      hooks: {
        draw: [(u) => drawFilterMarks(u, twist.rpm, twist.deg, filtered, COLOURS.twist)],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            report.current?.(twist.rpm[i]!);
            setReadout(
              `${rpmText(twist.rpm[i])} · twist ${degreesText(twist.deg[i])} (0-peak) · ${
                twist.method[i] === "filter"
                  ? "measured by the order filter"
                  : `${countText(twist.blocks[i]!, "block")}`
              }`,
            );
          },
        ],
      },
    };
  }, [twist, charts, syncKey]);

  // A new chart starts without a stale reading.
  useEffect(() => setReadout(""), [options]);

  const filtered = twist?.method.filter((m) => m === "filter").length ?? 0;
  const legend: LegendEntry[] = [
    { kind: "line", label: "Twist amplitude at the firing order", colour: COLOURS.twist },
    ...(filtered
      ? [
          {
            kind: "point" as const,
            shape: "square" as const,
            label: "Measured by the order filter (engine start, stop or fast change)",
            colour: COLOURS.twist,
          },
        ]
      : []),
  ];

  const status = !charts ? "loading" : twist && twist.rpm.length ? "ready" : "empty";
  let summary: string | undefined;
  if (charts && twist && twist.rpm.length) {
    const peak = twist.deg.indexOf(Math.max(...twist.deg));
    summary = `Twist at order ${charts.firingOrder} over ${rpmRangeText(twist.rpm[0], twist.rpm[twist.rpm.length - 1])}: largest ${degreesText(twist.deg[peak])} (0-peak) at ${rpmText(twist.rpm[peak])}.${filtered ? ` ${countText(filtered, "point")} measured by the order filter.` : ""}`;
  }

  return (
    <ChartFrame
      chart="twist-curve"
      title={TITLE}
      height={ENGINE_SPEED_CHART_HEIGHT}
      status={status}
      note={
        twist
          ? `The angle between the damper's primary and secondary side, ∫(crank − gearbox-input speed) dt, with its slow drift removed (high-pass at ${fixed(twist.driftCutoffHz, 2)} Hz): it shows the oscillating twist, not the static twist under load.`
          : "The angle between the damper's primary and secondary side, from the two speed channels."
      }
      emptyMessage={
        twist
          ? "No engine-speed bin has a twist amplitude in this drive log."
          : "This analysis was made before the twist angle was measured: re-analyse the drive log to draw the twist curve."
      }
      legend={legend}
      readout={
        readout || "Point at the chart, or focus it and use the arrow keys, to read the twist."
      }
      summary={summary}
      onCsv={() =>
        twist &&
        charts &&
        downloadCsv(
          TITLE,
          buildCsv(
            [
              "engine speed (rpm)",
              `twist order ${charts.firingOrder} (deg 0-peak)`,
              "blocks",
              "measured by",
            ],
            columnsToRows([twist.rpm, twist.deg, twist.blocks, twist.method]),
          ),
          fileSuffix,
        )
      }
      onPng={png(TITLE, legend, fileSuffix)}
    >
      {(summaryId) => (
        <FramePlot
          height={ENGINE_SPEED_CHART_HEIGHT}
          options={options}
          data={data}
          label={`${TITLE}: twist in degrees against engine speed in rpm. Use the left and right arrow keys to move the engine-speed cursor.`}
          describedBy={summaryId}
          onPlot={onPlot}
        />
      )}
    </ChartFrame>
  );
});
