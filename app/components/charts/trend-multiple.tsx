import { memo, useMemo, useState } from "react";
import type uPlot from "uplot";
import type { TrendQuantity, TrendThresholds, VariantTrend } from "~/lib/domain/trend";
import { COLOURS, FONT_FAMILY } from "./palette";
import { Plot, type PlotOptions } from "./plot";
import { cursor, drawYLine, fillDiamond, lineSeries, px, xAxis, yAxis } from "./plot-kit";
import { trendSeries } from "./trend-series";

const DAY = 86400;

const dayFormat = new Intl.DateTimeFormat("en-GB", {
  day: "numeric",
  month: "short",
  timeZone: "UTC",
});

/** "4 Nov": the axis ticks of a test date (UTC, like every date on screen). */
function dayText(seconds: number): string {
  return dayFormat.format(new Date(seconds * 1000));
}

/**
 * One small multiple of the damper-health trend: one quantity of one damper variant against test
 * date, the baseline as a dashed line, the band of changes that are not flagged, and flagged
 * points as red diamonds. The figures themselves are in the card's table (its text alternative).
 */
export const TrendMultiple = memo(function TrendMultiple({
  variant,
  quantity,
  thresholds,
  title,
  axisLabel,
  describe,
}: {
  variant: VariantTrend;
  quantity: TrendQuantity;
  thresholds: TrendThresholds;
  title: string;
  /** The y axis with its unit, e.g. "Natural frequency, Hz". */
  axisLabel: string;
  /** A figure with its unit, for the readout. */
  describe: (value: number | null) => string;
}) {
  const [readout, setReadout] = useState("");
  const none = variant.points.every((p) => p[quantity] === null);
  const series = useMemo(
    () => trendSeries(variant, quantity, thresholds),
    [variant, quantity, thresholds],
  );
  const data = useMemo<uPlot.AlignedData>(() => [series.x, series.y], [series]);
  const options = useMemo<PlotOptions>(() => {
    const band = series.band;
    return {
      scales: {
        x: {
          time: true,
          // Room either side so the first and last points (and a flag) are not cut at the edge.
          range: (_u, min, max) => {
            const pad = Math.max(2 * DAY, (max - min) * 0.06);
            return [min - pad, max + pad];
          },
        },
        y: {
          range: (_u, min, max) => {
            let lo = Math.min(min ?? 0, ...(band ?? []));
            let hi = Math.max(max ?? 1, ...(band ?? []));
            if (!Number.isFinite(lo) || !Number.isFinite(hi)) [lo, hi] = [0, 1];
            if (lo === hi) [lo, hi] = [lo - 1, hi + 1];
            const pad = (hi - lo) * 0.12;
            return [lo - pad, hi + pad];
          },
        },
      },
      axes: [
        xAxis("Test date", { values: (_u, splits) => splits.map(dayText) }),
        yAxis(axisLabel, { size: 48 }),
      ],
      series: [
        { label: "Test date" },
        lineSeries(title, COLOURS.isolation, {
          width: 1.5,
          spanGaps: true,
          points: { show: true, size: 6 },
        }),
      ],
      legend: { show: false },
      cursor: cursor(),
      hooks: {
        drawClear: [(u) => band && drawBand(u, band)],
        draw: [
          (u) =>
            series.baseline !== null &&
            drawYLine(u, series.baseline, COLOURS.marker, { dash: [5, 4], width: 1 }),
          (u) => drawFlags(u, series.x, series.y, series.flagged),
        ],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            if (i == null) return;
            const p = variant.points[i]!;
            setReadout(`${dayText(series.x[i]!)}: ${describe(p[quantity])} · ${p.fileName}`);
          },
        ],
      },
    };
  }, [series, title, axisLabel, variant, quantity, describe]);

  return (
    <figure
      data-chart={`trend-${quantity}`}
      data-variant={variant.damperVariant}
      className="min-w-0 rounded-md border border-neutral-200 p-3"
    >
      <figcaption className="text-sm font-medium text-neutral-800">{title}</figcaption>
      <div className="mt-2 h-[200px]">
        {none ? (
          <p className="flex h-full items-center justify-center rounded-md border border-dashed border-neutral-300 px-4 text-center text-xs text-neutral-600">
            No drive log of this variant has this figure yet.
          </p>
        ) : (
          <Plot
            height={200}
            options={options}
            data={data}
            label={`${title} of damper variant ${variant.damperVariant} against test date; the figures are in the table below.`}
          />
        )}
      </div>
      <p className="mt-1 min-h-4 text-xs text-neutral-700 tabular-nums" aria-hidden="true">
        {readout}
      </p>
    </figure>
  );
});

/** The band of changes that are not flagged, around the baseline (drawn under the series). */
function drawBand(u: uPlot, [lo, hi]: [number, number]) {
  const { ctx, bbox } = u;
  const y0 = u.valToPos(hi, "y", true);
  const y1 = u.valToPos(lo, "y", true);
  ctx.save();
  ctx.beginPath();
  ctx.rect(bbox.left, bbox.top, bbox.width, bbox.height);
  ctx.clip();
  ctx.fillStyle = COLOURS.bandA;
  ctx.fillRect(bbox.left, y0, bbox.width, y1 - y0);
  ctx.restore();
}

/** Flagged points: a red diamond with "!" beside it. */
function drawFlags(u: uPlot, xs: number[], ys: (number | null)[], flagged: boolean[]) {
  const { ctx } = u;
  const s = px(u);
  ctx.save();
  ctx.fillStyle = COLOURS.fail;
  ctx.font = `700 ${11 * s}px ${FONT_FAMILY}`;
  ctx.textBaseline = "middle";
  xs.forEach((x, i) => {
    const y = ys[i];
    if (!flagged[i] || y === null || y === undefined) return;
    const cx = u.valToPos(x, "x", true);
    const cy = u.valToPos(y, "y", true);
    fillDiamond(ctx, cx, cy, 5 * s, 6 * s);
    const right = cx + 12 * s < u.bbox.left + u.bbox.width;
    ctx.textAlign = right ? "left" : "right";
    ctx.fillText("!", right ? cx + 8 * s : cx - 8 * s, cy);
  });
  ctx.restore();
}
