import { useEffect, useMemo, useRef, useState } from "react";
import uPlot from "uplot";
import {
  AMPLITUDE_UNITS,
  amplitudeAxisLabel,
  convertAmplitude,
  type AmplitudeUnit,
} from "~/lib/domain/chart-units";
import {
  amplitudeNumber,
  amplitudeText,
  dbRangeText,
  dbText,
  rpmRangeText,
  rpmText,
} from "~/lib/domain/format";
import { ChartFrame, ChartsError, Segmented } from "./chart-frame";
import { buildCsv } from "./csv";
import { downloadCsv, downloadPng } from "./download";
import type { LegendEntry } from "./legend";
import { COLOURS, OVERLAY_STYLES } from "./palette";
import { FramePlot } from "./frame-plot";
import type { PlotOptions } from "./plot";
import { cursor, drawYLine, fromZero, rangeWith, xAxis, xRangeAround, yAxis } from "./plot-kit";
import { useCurvesQuery } from "./queries";
import type { CurveSet, ExportContext } from "./types";

export const OVERLAY_HEIGHT = 340;
type Side = "crank" | "gearbox";

/** The style of the i-th drive log in an overlay (colour and dash; repeats after eight). */
export function overlayStyle(i: number) {
  return OVERLAY_STYLES[i % OVERLAY_STYLES.length]!;
}

/**
 * Several drive logs' isolation curves (dB) or firing-order curves (one side at a time) against
 * engine speed, each in its own Okabe–Ito colour and dash pattern.
 */
export function CurveOverlay({
  curvesUrl,
  kind,
  highlight,
  exportContext,
}: {
  curvesUrl: string;
  kind: "isolation" | "order";
  /** A drive-log id drawn heavier than the others. */
  highlight?: number;
  /** The vehicle named in the PNG export's caption (the drive logs are the curves' labels). */
  exportContext?: ExportContext;
}) {
  const query = useCurvesQuery(curvesUrl);
  // The gearbox input first: that is where damper variants differ (the crank side is the engine's
  // excitation, nearly the same for every variant).
  const [side, setSide] = useState<Side>("gearbox");
  const [unit, setUnit] = useState<AmplitudeUnit>("rpm");
  const [readout, setReadout] = useState("");
  const plot = useRef<uPlot | null>(null);
  const curves = query.data?.curves ?? null;
  const baseName = kind === "isolation" ? "Isolation curves" : "Firing-order curves";
  const title =
    kind === "isolation"
      ? baseName
      : `${baseName} — ${side === "crank" ? "crank side" : "gearbox input"}`;

  const data = useMemo<uPlot.AlignedData>(() => {
    if (!curves?.length) return [[]];
    const tables = curves.map((c): uPlot.AlignedData => {
      if (kind === "isolation") return [c.isolation.rpm, c.isolation.dB];
      const a = side === "crank" ? c.firingOrder.crankRpm : c.firingOrder.gearboxRpm;
      return [
        c.firingOrder.rpm,
        a.map((v, i) => convertAmplitude(v, unit, c.firingOrderValue, c.firingOrder.rpm[i]!)),
      ];
    });
    return uPlot.join(tables);
  }, [curves, kind, side, unit]);

  const options = useMemo<PlotOptions | null>(() => {
    if (!curves?.length) return null;
    return {
      scales: {
        x: { time: false, range: xRangeAround(250) },
        y: { range: kind === "isolation" ? rangeWith(0) : fromZero },
      },
      axes: [
        xAxis("Engine speed, rpm"),
        yAxis(
          kind === "isolation" ? "Isolation at the firing order, dB" : amplitudeAxisLabel(unit),
          { size: 56 },
        ),
      ],
      series: [
        { label: "Engine speed, rpm" },
        ...curves.map((c, i) => ({
          label: c.label,
          stroke: overlayStyle(i).colour,
          dash: overlayStyle(i).dash,
          width: c.logId === highlight ? 3 : 2,
          spanGaps: true,
          // A curve of a few bins (an idle log) is drawn as dots, or it would not show at all.
          points: { show: pointsOf(c, kind) < 4, size: 8, fill: overlayStyle(i).colour },
        })),
      ],
      legend: { show: false },
      cursor: cursor(),
      hooks: {
        draw: kind === "isolation" ? [(u) => drawYLine(u, 0, COLOURS.zero, { label: "0 dB" })] : [],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            const text = (v: number | null | undefined) =>
              v == null ? "—" : kind === "isolation" ? dbText(v) : amplitudeText(v, unit);
            setReadout(
              `${rpmText(u.data[0][i])} · ${curves
                .map((c, k) => `${c.label}: ${text(u.data[k + 1]![i])}`)
                .join(" · ")}`,
            );
          },
        ],
      },
    };
  }, [curves, kind, unit, highlight]);

  // A new chart (order, unit, data) or row starts without a stale reading.
  useEffect(() => setReadout(""), [options]);

  const legend: LegendEntry[] = (curves ?? []).map((c, i) => ({
    kind: "line",
    label: c.label,
    colour: overlayStyle(i).colour,
    dash: overlayStyle(i).dash,
    width: c.logId === highlight ? 3 : 2,
  }));
  if (kind === "isolation" && curves?.length)
    legend.push({ kind: "line", label: "0 dB: no isolation", colour: COLOURS.zero, width: 1.25 });

  const status = query.isPending ? "loading" : curves?.length ? "ready" : "empty";
  const summary = curves?.length ? summarise(curves, kind, side) : undefined;

  function csv() {
    if (!curves) return;
    if (kind === "isolation") {
      const rows = curves.flatMap((c) =>
        c.isolation.rpm.map((r, i) => [c.logId, c.label, r, c.isolation.dB[i]]),
      );
      downloadCsv(
        baseName,
        buildCsv(
          ["drive log id", "drive log", "engine speed (rpm)", "isolation at the firing order (dB)"],
          rows,
        ),
      );
      return;
    }
    const header = [
      "drive log id",
      "drive log",
      "firing order",
      "engine speed (rpm)",
      "crank amplitude (rpm)",
      "gearbox input amplitude (rpm)",
    ];
    if (unit !== "rpm")
      header.push(`${side === "crank" ? "crank" : "gearbox input"} amplitude (${unit})`);
    const rows = curves.flatMap((c) =>
      c.firingOrder.rpm.map((r, i) => {
        const a = side === "crank" ? c.firingOrder.crankRpm[i]! : c.firingOrder.gearboxRpm[i]!;
        return [
          c.logId,
          c.label,
          c.firingOrderValue,
          r,
          c.firingOrder.crankRpm[i],
          c.firingOrder.gearboxRpm[i],
          ...(unit !== "rpm" ? [convertAmplitude(a, unit, c.firingOrderValue, r)] : []),
        ];
      }),
    );
    downloadCsv(baseName, buildCsv(header, rows));
  }

  if (query.isError)
    return (
      <div
        data-chart={kind === "isolation" ? "overlay-isolation" : "overlay-order"}
        data-status="error"
      >
        <ChartsError error={query.error} onRetry={() => void query.refetch()} />
      </div>
    );

  return (
    <ChartFrame
      chart={kind === "isolation" ? "overlay-isolation" : "overlay-order"}
      title={title}
      exportName={baseName}
      height={OVERLAY_HEIGHT}
      status={status}
      attrs={kind === "order" ? { "data-side": side, "data-unit": unit } : undefined}
      controls={
        kind === "order" ? (
          <>
            <Segmented
              legend="Side"
              value={side}
              disabled={!curves?.length}
              options={[
                { value: "crank", label: "Crank" },
                { value: "gearbox", label: "Gearbox input" },
              ]}
              onChange={setSide}
            />
            <Segmented
              legend="Unit"
              value={unit}
              disabled={!curves?.length}
              options={AMPLITUDE_UNITS.map((u) => ({ value: u, label: u }))}
              onChange={setUnit}
            />
          </>
        ) : undefined
      }
      emptyMessage="No analysed drive logs to compare: choose drive logs whose analysis has finished."
      legend={legend}
      readout={readout || "Point at the chart to read each drive log's value."}
      summary={summary}
      onCsv={csv}
      onPng={() =>
        plot.current &&
        void downloadPng(title, plot.current.ctx.canvas, legend, undefined, {
          driveLog: curves?.map((c) => c.label).join(", "),
          ...exportContext,
        })
      }
    >
      {(summaryId) => (
        <FramePlot
          height={OVERLAY_HEIGHT}
          options={options}
          data={data}
          label={`${title}: ${curves?.length ?? 0} drive logs against engine speed in rpm`}
          describedBy={summaryId}
          onPlot={(u) => (plot.current = u)}
        />
      )}
    </ChartFrame>
  );
}

function pointsOf(c: CurveSet, kind: "isolation" | "order"): number {
  return kind === "isolation" ? c.isolation.rpm.length : c.firingOrder.rpm.length;
}

function summarise(curves: CurveSet[], kind: "isolation" | "order", side: Side): string {
  return curves
    .map((c, i) => {
      const style = overlayStyle(i).name;
      if (kind === "isolation") {
        const d = c.isolation.dB;
        if (!d.length) return `${c.label} (${style}): no isolation points.`;
        return `${c.label} (${style}): ${dbRangeText(Math.min(...d), Math.max(...d))} over ${rpmRangeText(c.isolation.rpm[0], c.isolation.rpm[c.isolation.rpm.length - 1])}.`;
      }
      const a = side === "crank" ? c.firingOrder.crankRpm : c.firingOrder.gearboxRpm;
      if (!a.length) return `${c.label} (${style}): no firing-order points.`;
      return `${c.label} (${style}): firing-order amplitude ${amplitudeNumber(Math.min(...a))} to ${amplitudeText(Math.max(...a), "rpm")}.`;
    })
    .join(" ");
}
