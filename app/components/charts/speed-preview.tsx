/**
 * The channel chooser's small chart of the picked speeds: crank-side and gearbox-input speed
 * against time as read with the picks (channel-preview.json, per bucket min and max), so a
 * swapped, noisy or wrongly scaled channel shows before the analysis runs. A pick that cannot be
 * read as a speed shows the reader's message under the chart; the form can still be sent.
 */
import { useMemo, useState } from "react";
import type uPlot from "uplot";
import { rpmRangeText, rpmText, secondsNumber, secondsText } from "~/lib/domain/format";
import { ErrorLine } from "../form";
import { extent } from "./chart-math";
import { ChartFrame } from "./chart-frame";
import { buildCsv, columnsToRows } from "./csv";
import { downloadCsv } from "./download";
import type { LegendEntry } from "./legend";
import { COLOURS } from "./palette";
import { FramePlot, usePlotPng } from "./frame-plot";
import type { PlotOptions } from "./plot";
import { cursor, lineSeries, xAxis, yAxis } from "./plot-kit";
import { useSpeedPreviewQuery } from "./queries";

const TITLE = "Picked speeds over time";
const HEIGHT = 200;

const LEGEND: LegendEntry[] = [
  { kind: "line", label: "Crank side", colour: COLOURS.crank },
  { kind: "line", label: "Gearbox input", colour: COLOURS.gearbox, dash: [6, 3] },
];

export function SpeedPreview({ url }: { url: string }) {
  const query = useSpeedPreviewQuery(url);
  const trace = query.data ?? null;
  const { onPlot, png } = usePlotPng();
  const [readout, setReadout] = useState("");

  const data = useMemo<uPlot.AlignedData>(
    () => (trace ? [trace.timeS, trace.crankRpm, trace.gearboxRpm] : [[]]),
    [trace],
  );
  const options = useMemo<PlotOptions | null>(
    () =>
      trace
        ? {
            scales: { x: { time: false } },
            axes: [xAxis("Time, s"), yAxis("Speed, rpm")],
            series: [
              { label: "Time, s" },
              lineSeries("Crank side", COLOURS.crank),
              lineSeries("Gearbox input", COLOURS.gearbox, { dash: [6, 3] }),
            ],
            legend: { show: false },
            cursor: cursor(),
            hooks: {
              setCursor: [
                (u) => {
                  const i = u.cursor.idx;
                  if (i == null) return;
                  setReadout(
                    `${secondsText(trace.timeS[i])} · crank side ${rpmText(trace.crankRpm[i])} · gearbox input ${rpmText(trace.gearboxRpm[i])}`,
                  );
                },
              ],
            },
          }
        : null,
    [trace],
  );

  const status = query.isPending ? "loading" : trace && trace.timeS.length ? "ready" : "empty";
  const crank = trace ? extent(trace.crankRpm) : null;
  const gearbox = trace ? extent(trace.gearboxRpm) : null;
  const summary = trace?.timeS.length
    ? `Crank side ${rpmRangeText(crank?.[0], crank?.[1])}, gearbox input ${rpmRangeText(gearbox?.[0], gearbox?.[1])} over ${secondsNumber(trace.timeS[0])}–${secondsText(trace.timeS.at(-1))}.`
    : undefined;

  return (
    <div className="space-y-2" data-speed-preview={query.isError ? "error" : status}>
      <ChartFrame
        chart="speed-preview"
        title={TITLE}
        height={HEIGHT}
        status={status}
        emptyMessage={
          query.isError
            ? "No preview for these picks: see the message below."
            : "The picked channels hold no samples."
        }
        legend={LEGEND}
        readout={
          readout || "Point at the chart, or focus it and use the arrow keys, to read the speeds."
        }
        summary={summary}
        onCsv={() =>
          trace &&
          downloadCsv(
            TITLE,
            buildCsv(
              ["time (s)", "crank-side speed (rpm)", "gearbox input speed (rpm)"],
              columnsToRows([trace.timeS, trace.crankRpm, trace.gearboxRpm]),
            ),
          )
        }
        onPng={png(TITLE, LEGEND)}
      >
        {(summaryId) => (
          <FramePlot
            height={HEIGHT}
            options={options}
            data={data}
            label={`${TITLE}: crank-side and gearbox-input speed in rpm against time in s, each bucket's lowest and highest value. Use the left and right arrow keys to move the time cursor.`}
            describedBy={summaryId}
            onPlot={onPlot}
          />
        )}
      </ChartFrame>
      {query.isError ? (
        <ErrorLine
          message={`These picks cannot be previewed: ${errorText(query.error)}. The analysis may still be started; it will say the same if the picks stay as they are.`}
        />
      ) : null}
    </div>
  );
}

function errorText(e: unknown): string {
  return (e instanceof Error ? e.message : String(e)).replace(/\.$/, "");
}
