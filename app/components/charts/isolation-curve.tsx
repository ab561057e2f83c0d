import { countText } from "~/lib/base/plural";
import { memo, useEffect, useMemo, useRef, useState } from "react";
import type uPlot from "uplot";
import { unresolvedBelow, type ChartData } from "~/lib/domain/chart-data";
import {
  dbText,
  isolationRangeText,
  frequencyText,
  dampingRatioText,
  rpmRangeText,
  rpmText,
} from "~/lib/domain/format";
import { ChartFrame } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import { commentLegend, type LegendEntry } from "./legend";
import { ENGINE_SPEED_CHART_HEIGHT } from "./order-curves";
import { drawTargetFills, isolationLayers } from "./isolation-layers";
import { COLOURS } from "./palette";
import { FramePlot, usePlotPng } from "./frame-plot";
import type { PlotOptions } from "./plot";
import { cursor, lineSeries, rangeWith, xAxis, xRangeAround, yAxis } from "./plot-kit";
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
  const { onPlot, png } = usePlotPng();
  const report = useRef(onCursorRpm);
  report.current = onCursorRpm;
  const rpmMarkers = useRpmMarkers(markers);
  const bands = useTargets(targets);
  const iso = charts?.isolation ?? null;
  const resonance = charts?.resonance ?? null;
  const model = charts?.model ?? null;
  const unresolved = unresolvedBelow(charts?.transient ?? null);

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
        drawClear: [(u) => drawTargetFills(u, bands)],
        // After the series; the target labels last, over every point (isolation-layers.ts).
        draw: isolationLayers(iso, bands, resonance, rpmMarkers),
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            const rpm = iso.rpm[i]!;
            report.current?.(rpm);
            const dB = iso.dB[i]!;
            const predicted = iso.modelDb?.[i];
            const target = bands.find((b) => rpm >= b.rpmFrom && rpm <= b.rpmTo);
            const how = iso.method[i] === "filter" ? " · measured by the order filter" : "";
            setReadout(
              `${rpmText(rpm)}${how} · ${iso.aboveNoise[i] ? `isolation ${dbText(dB)}` : `isolation at least ${dbText(dB)} (gearbox input at the noise floor)`}${predicted !== undefined ? ` · model ${dbText(predicted)}` : ""}${target ? ` · target ${target.name}: at least ${dbText(target.minDb)}, ${dB >= target.minDb ? "met" : iso.aboveNoise[i] ? "not met" : "not shown (lower bound)"}` : ""}`,
            );
          },
        ],
      },
    };
  }, [iso, charts, bands, resonance, syncKey, rpmMarkers]);

  const hasLowerBounds = iso?.aboveNoise.some((a) => !a) ?? false;
  const filtered = iso?.method.filter((m) => m === "filter").length ?? 0;
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
    ...(filtered
      ? [
          {
            kind: "point" as const,
            shape: "square" as const,
            label: "Measured by the order filter (engine start, stop or fast change)",
            colour: COLOURS.isolation,
          },
        ]
      : []),
    ...(model && iso?.modelDb
      ? [
          {
            kind: "line" as const,
            label: `Two-mass model fit: natural frequency ${frequencyText(model.naturalFrequencyHz)}, damping ratio ${dampingRatioText(model.dampingRatio)}`,
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
    const range = isolationRangeText(iso.dB, iso.aboveNoise);
    const lower = iso.aboveNoise.filter((a) => !a).length;
    summary = `Isolation at order ${charts.firingOrder} over ${rpmRangeText(iso.rpm[0], iso.rpm[iso.rpm.length - 1])}: ${range ?? "—"}${lower < iso.rpm.length ? " above the noise floor" : ""}; ${lower} of ${countText(iso.rpm.length, "point")} ${lower === 1 ? "is a lower bound" : "are lower bounds"}.${filtered ? ` ${countText(filtered, "point")} measured by the order filter.` : ""}${unresolved ? ` ${unresolvedText(unresolved)}` : ""} ${resonance ? `Damper resonance at ${rpmText(resonance.rpm)}, ${dbText(resonance.isolationDb)}.` : "No damper resonance in this drive log."}${bands.length ? ` Targets: ${bands.map((b) => `${b.name} at least ${dbText(b.minDb)} over ${rpmRangeText(b.rpmFrom, b.rpmTo)}`).join("; ")}.` : ""}`;
  }

  return (
    <ChartFrame
      chart="isolation-curve"
      title={TITLE}
      height={ENGINE_SPEED_CHART_HEIGHT}
      status={status}
      note={
        charts ? (
          <>
            {`At the firing order (${charts.firingOrder}): 20·log10(crank / gearbox-input amplitude). Above 0 dB the damper attenuates; below it amplifies.`}
            {unresolved ? (
              <span data-note="unresolved" className="mt-1 block text-neutral-800">
                {unresolvedText(unresolved)}
              </span>
            ) : null}
          </>
        ) : (
          "At the firing order: 20·log10(crank / gearbox-input amplitude)."
        )
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
              "measured by",
            ],
            columnsToRows([
              iso.rpm,
              iso.dB,
              iso.aboveNoise,
              ...(iso.modelDb ? [iso.modelDb] : []),
              iso.method,
            ]),
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
          label={`${TITLE}: isolation in dB against engine speed in rpm. Use the left and right arrow keys to move the engine-speed cursor.`}
          describedBy={summaryId}
          onPlot={onPlot}
        />
      )}
    </ChartFrame>
  );
});

/** "Not resolved below 250 rpm." and the analysis' own sentence why. */
function unresolvedText(u: { rpm: number; reason: string }): string {
  const reason = u.reason.trim();
  return `Not resolved below ${rpmText(u.rpm)}. ${reason}${/[.!?]$/.test(reason) ? "" : "."}`;
}
