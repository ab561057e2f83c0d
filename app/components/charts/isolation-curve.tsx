import { memo, useEffect, useMemo, useRef, useState } from "react";
import type uPlot from "uplot";
import type { ChartData } from "~/lib/chart-data";
import { extent, formatValue } from "./chart-math";
import { ChartFrame } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv, downloadPng } from "./download";
import { commentLegend, type LegendEntry } from "./legend";
import { ENGINE_SPEED_CHART_HEIGHT } from "./order-curves";
import { COLOURS, FONT_FAMILY } from "./palette";
import { Plot, type PlotOptions } from "./plot";
import {
  cursor,
  drawXMarkers,
  drawYLine,
  lineSeries,
  px,
  rangeWith,
  xAxis,
  xRangeAround,
  yAxis,
} from "./plot-kit";
import type { ChartMarker, TargetBand } from "./types";
import { useRpmMarkers, useTargets } from "./use-stable";

const TITLE = "Isolation curve";

/** Isolation at the firing order (dB) against engine speed, with targets and the resonance. */
export const IsolationCurve = memo(function IsolationCurve({
  charts,
  syncKey,
  onCursorRpm,
  markers,
  targets,
  fileSuffix,
}: {
  charts: ChartData | null;
  syncKey?: string;
  onCursorRpm?: (rpm: number) => void;
  markers?: ChartMarker[];
  targets?: TargetBand[];
  fileSuffix?: string;
}) {
  const [readout, setReadout] = useState("");
  const plot = useRef<uPlot | null>(null);
  const report = useRef(onCursorRpm);
  report.current = onCursorRpm;
  const rpmMarkers = useRpmMarkers(markers);
  const bands = useTargets(targets);
  const iso = charts?.isolation ?? null;
  const resonance = charts?.resonance ?? null;
  const model = charts?.model ?? null;

  const data = useMemo<uPlot.AlignedData>(() => {
    if (!iso) return [[]];
    return [
      iso.rpm,
      iso.dB.map((v, i) => (iso.aboveNoise[i] ? v : null)),
      iso.dB.map((v, i) => (iso.aboveNoise[i] ? null : v)),
      ...(iso.modelDb ? [iso.modelDb] : []),
    ];
  }, [iso]);

  const options = useMemo<PlotOptions | null>(() => {
    if (!iso || !charts) return null;
    const keep = [0, ...bands.map((b) => b.minDb), ...(resonance ? [resonance.isolationDb] : [])];
    return {
      scales: {
        x: { time: false, range: xRangeAround(5 * charts.binRpm) },
        y: { range: rangeWith(...keep) },
      },
      axes: [xAxis("Engine speed, rpm"), yAxis(`Isolation at order ${charts.firingOrder}, dB`)],
      series: [
        { label: "Engine speed, rpm" },
        lineSeries("Isolation", COLOURS.isolation, {
          points: { show: true, size: iso.rpm.length < 4 ? 8 : 4 },
        }),
        {
          label: "Lower bound",
          stroke: COLOURS.isolation,
          paths: () => null,
          points: { show: false },
        },
        ...(iso.modelDb
          ? [lineSeries("Two-mass model", COLOURS.marker, { width: 1.25, dash: [6, 4] })]
          : []),
      ],
      legend: { show: false },
      cursor: cursor(syncKey),
      hooks: {
        drawClear: [(u) => drawTargets(u, bands, false)],
        draw: [
          (u) => drawYLine(u, 0, COLOURS.zero, { label: "0 dB" }),
          (u) => drawTargets(u, bands, true),
          (u) => drawLowerBounds(u, iso),
          (u) => drawBelowTarget(u, iso, bands),
          (u) => resonance && drawResonance(u, resonance),
          (u) => drawXMarkers(u, rpmMarkers),
        ],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            const rpm = iso.rpm[i]!;
            report.current?.(rpm);
            const dB = iso.dB[i]!;
            const predicted = iso.modelDb?.[i];
            const target = bands.find((b) => rpm >= b.rpmFrom && rpm <= b.rpmTo);
            setReadout(
              `${formatValue(rpm)} rpm · ${iso.aboveNoise[i] ? `isolation ${formatValue(dB)} dB` : `isolation at least ${formatValue(dB)} dB (gearbox input at the noise floor)`}${predicted !== undefined ? ` · model ${formatValue(predicted)} dB` : ""}${target ? ` · target ${target.name}: at least ${formatValue(target.minDb)} dB, ${dB >= target.minDb ? "met" : iso.aboveNoise[i] ? "not met" : "not shown (lower bound)"}` : ""}`,
            );
          },
        ],
      },
    };
  }, [iso, charts, bands, resonance, syncKey, rpmMarkers]);

  const hasLowerBounds = iso?.aboveNoise.some((a) => !a) ?? false;
  // A new chart (order, unit, data) or row starts without a stale reading.
  useEffect(() => setReadout(""), [options]);

  const legend: LegendEntry[] = [
    { kind: "line", label: "Isolation (above the noise floor)", colour: COLOURS.isolation },
    ...(hasLowerBounds
      ? [
          {
            kind: "point" as const,
            shape: "caret" as const,
            label: "Lower bound: gearbox input at the noise floor, isolation at least this",
            colour: COLOURS.isolation,
          },
        ]
      : []),
    ...(model && iso?.modelDb
      ? [
          {
            kind: "line" as const,
            label: `Two-mass model fit: natural frequency ${formatValue(model.naturalFrequencyHz)} Hz, damping ratio ${formatValue(model.dampingRatio)}`,
            colour: COLOURS.marker,
            dash: [6, 4],
            width: 1.25,
          },
        ]
      : []),
    { kind: "line", label: "0 dB: no isolation", colour: COLOURS.zero, width: 1.25 },
    ...(bands.length
      ? [
          {
            kind: "area" as const,
            label: "Below a target (range and minimum)",
            colour: COLOURS.failFill,
            border: COLOURS.fail,
          },
          { kind: "point" as const, label: "Point below its target", colour: COLOURS.fail },
        ]
      : []),
    ...(resonance
      ? [
          {
            kind: "point" as const,
            shape: "diamond" as const,
            label: "Damper resonance (least isolation)",
            colour: COLOURS.marker,
          },
        ]
      : []),
    ...commentLegend(rpmMarkers),
  ];

  const status = !charts ? "loading" : iso && iso.rpm.length ? "ready" : "empty";
  let summary: string | undefined;
  if (charts && iso && iso.rpm.length) {
    const trusted = iso.dB.filter((_, i) => iso.aboveNoise[i]);
    const range = extent(trusted.length ? trusted : iso.dB);
    const lower = iso.aboveNoise.filter((a) => !a).length;
    summary = `Isolation at order ${charts.firingOrder} from ${formatValue(iso.rpm[0])} to ${formatValue(iso.rpm[iso.rpm.length - 1])} rpm: between ${formatValue(range?.[0])} and ${formatValue(range?.[1])} dB; ${lower} of ${iso.rpm.length} points are lower bounds. ${resonance ? `Damper resonance at ${formatValue(resonance.rpm)} rpm, ${formatValue(resonance.isolationDb)} dB.` : "No damper resonance in this drive log."}${bands.length ? ` Targets: ${bands.map((b) => `${b.name} at least ${formatValue(b.minDb)} dB from ${formatValue(b.rpmFrom)} to ${formatValue(b.rpmTo)} rpm`).join("; ")}.` : ""}`;
  }

  return (
    <ChartFrame
      chart="isolation-curve"
      title={TITLE}
      height={ENGINE_SPEED_CHART_HEIGHT}
      status={status}
      note={
        charts
          ? `At the firing order (${charts.firingOrder}): 20·log10(crank / gearbox-input amplitude). Above 0 dB the damper attenuates; below it amplifies.`
          : "At the firing order: 20·log10(crank / gearbox-input amplitude)."
      }
      emptyMessage="No engine-speed bin has enough blocks for the isolation curve. A longer drive log, or re-analysing with a wider engine-speed bin, gives one."
      legend={legend}
      readout={
        readout || "Point at the chart, or focus it and use the arrow keys, to read the isolation."
      }
      summary={summary}
      onCsv={() =>
        iso &&
        charts &&
        downloadCsv(
          TITLE,
          buildCsv(
            [
              "engine speed (rpm)",
              `isolation order ${charts.firingOrder} (dB)`,
              "above noise",
              ...(iso.modelDb ? ["two-mass model isolation (dB)"] : []),
            ],
            columnsToRows([iso.rpm, iso.dB, iso.aboveNoise, ...(iso.modelDb ? [iso.modelDb] : [])]),
          ),
          fileSuffix,
        )
      }
      onPng={() =>
        plot.current && void downloadPng(TITLE, plot.current.ctx.canvas, legend, fileSuffix)
      }
    >
      {(summaryId) =>
        options ? (
          <Plot
            height={ENGINE_SPEED_CHART_HEIGHT}
            options={options}
            data={data}
            keyboard
            label={`${TITLE}: isolation in dB against engine speed in rpm. Use the left and right arrow keys to move the engine-speed cursor.`}
            describedBy={summaryId}
            onPlot={(u) => (plot.current = u)}
          />
        ) : null
      }
    </ChartFrame>
  );
});

function drawTargets(u: uPlot, bands: TargetBand[], labels: boolean) {
  const { ctx, bbox } = u;
  const s = px(u);
  const y = u.scales.y!;
  if (y.min == null || y.max == null) return;
  ctx.save();
  ctx.beginPath();
  ctx.rect(bbox.left, bbox.top, bbox.width, bbox.height);
  ctx.clip();
  bands.forEach((b, i) => {
    const x0 = u.valToPos(b.rpmFrom, "x", true);
    const x1 = u.valToPos(b.rpmTo, "x", true);
    const top = u.valToPos(Math.min(Math.max(b.minDb, y.min!), y.max!), "y", true);
    const bottom = bbox.top + bbox.height;
    if (!labels) {
      ctx.fillStyle = COLOURS.failFill;
      ctx.fillRect(x0, top, x1 - x0, bottom - top);
      return;
    }
    ctx.strokeStyle = COLOURS.fail;
    ctx.lineWidth = 1.5 * s;
    ctx.setLineDash([6 * s, 3 * s]);
    ctx.beginPath();
    ctx.moveTo(x0, top);
    ctx.lineTo(x1, top);
    ctx.stroke();
    ctx.setLineDash([]);
    ctx.font = `500 ${11 * s}px ${FONT_FAMILY}`;
    ctx.fillStyle = COLOURS.fail;
    ctx.textAlign = "left";
    ctx.textBaseline = "top";
    const text = `${b.name}: at least ${formatValue(b.minDb)} dB`;
    // Inside the band from its left edge, or right-aligned when it would run off the plot.
    const right = bbox.left + bbox.width;
    const w = ctx.measureText(text).width;
    const x = Math.max(bbox.left, x0) + 4 * s;
    ctx.fillText(
      text,
      x + w > right - 4 * s ? Math.max(bbox.left + 4 * s, right - 4 * s - w) : x,
      top + (4 + (i % 2) * 13) * s,
    );
  });
  ctx.restore();
}

/** Lower-bound points: a hollow ring with a caret above (the true value lies higher). */
function drawLowerBounds(u: uPlot, iso: ChartData["isolation"]) {
  const { ctx } = u;
  const s = px(u);
  ctx.save();
  ctx.strokeStyle = COLOURS.isolation;
  ctx.fillStyle = "white";
  ctx.lineWidth = 1.5 * s;
  iso.rpm.forEach((rpm, i) => {
    if (iso.aboveNoise[i]) return;
    const x = u.valToPos(rpm, "x", true);
    const y = u.valToPos(iso.dB[i]!, "y", true);
    ctx.beginPath();
    ctx.arc(x, y, 3.5 * s, 0, 2 * Math.PI);
    ctx.fill();
    ctx.stroke();
    ctx.beginPath();
    ctx.moveTo(x - 3.5 * s, y - 6 * s);
    ctx.lineTo(x, y - 9.5 * s);
    ctx.lineTo(x + 3.5 * s, y - 6 * s);
    ctx.stroke();
  });
  ctx.restore();
}

function drawBelowTarget(u: uPlot, iso: ChartData["isolation"], bands: TargetBand[]) {
  if (!bands.length) return;
  const { ctx } = u;
  const s = px(u);
  ctx.save();
  ctx.fillStyle = COLOURS.fail;
  iso.rpm.forEach((rpm, i) => {
    if (!iso.aboveNoise[i]) return;
    const dB = iso.dB[i]!;
    if (!bands.some((b) => rpm >= b.rpmFrom && rpm <= b.rpmTo && dB < b.minDb)) return;
    ctx.beginPath();
    ctx.arc(u.valToPos(rpm, "x", true), u.valToPos(dB, "y", true), 3.5 * s, 0, 2 * Math.PI);
    ctx.fill();
  });
  ctx.restore();
}

function drawResonance(u: uPlot, r: { rpm: number; isolationDb: number }) {
  const { ctx, bbox } = u;
  const s = px(u);
  const x = u.valToPos(r.rpm, "x", true);
  const y = u.valToPos(r.isolationDb, "y", true);
  ctx.save();
  ctx.fillStyle = COLOURS.marker;
  ctx.beginPath();
  ctx.moveTo(x, y - 7 * s);
  ctx.lineTo(x + 6 * s, y);
  ctx.lineTo(x, y + 7 * s);
  ctx.lineTo(x - 6 * s, y);
  ctx.closePath();
  ctx.fill();
  ctx.font = `500 ${11 * s}px ${FONT_FAMILY}`;
  const text = `Resonance ${formatValue(r.rpm)} rpm, ${formatValue(r.isolationDb)} dB`;
  const w = ctx.measureText(text).width;
  const right = x + 10 * s + w < bbox.left + bbox.width;
  ctx.textAlign = "left";
  ctx.textBaseline = "middle";
  ctx.fillText(
    text,
    right ? x + 10 * s : x - 10 * s - w,
    y + (y > bbox.top + 20 * s ? -12 * s : 12 * s),
  );
  ctx.restore();
}
