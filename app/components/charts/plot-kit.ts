/** Shared uPlot settings and canvas drawing for the charts (client side). */
import type uPlot from "uplot";
import { formatValue } from "./chart-math";
import { COLOURS, FONT_FAMILY } from "./palette";

export const AXIS_FONT = `12px ${FONT_FAMILY}`;
export const LABEL_FONT = `500 12px ${FONT_FAMILY}`;

function tickValues(_u: uPlot, splits: number[]) {
  return splits.map((v) => formatValue(v, 6));
}

export function xAxis(label: string, extra: Partial<uPlot.Axis> = {}): uPlot.Axis {
  return {
    label,
    font: AXIS_FONT,
    labelFont: LABEL_FONT,
    stroke: COLOURS.axis,
    grid: { stroke: COLOURS.grid, width: 1 },
    ticks: { stroke: COLOURS.grid, width: 1, size: 4 },
    values: tickValues,
    labelSize: 20,
    size: 36,
    ...extra,
  };
}

export function yAxis(label: string, extra: Partial<uPlot.Axis> = {}): uPlot.Axis {
  return {
    label,
    font: AXIS_FONT,
    labelFont: LABEL_FONT,
    stroke: COLOURS.axis,
    grid: { stroke: COLOURS.grid, width: 1 },
    ticks: { stroke: COLOURS.grid, width: 1, size: 4 },
    values: tickValues,
    labelSize: 22,
    size: 52,
    ...extra,
  };
}

/** Cursor: a vertical line only, no drag-to-zoom; optionally in a sync group on the x value. */
export function cursor(syncKey?: string): uPlot.Cursor {
  return {
    x: true,
    y: false,
    drag: { x: false, y: false, setScale: false },
    points: { size: 7, width: 1.5 },
    ...(syncKey ? { sync: { key: syncKey, scales: ["x", null] as [string, null] } } : {}),
  };
}

export function lineSeries(label: string, stroke: string, extra: Partial<uPlot.Series> = {}) {
  return {
    label,
    stroke,
    width: 2,
    points: { show: false },
    spanGaps: false,
    ...extra,
  } satisfies uPlot.Series;
}

/** Canvas pixels per CSS pixel of a plot. */
export function px(u: uPlot): number {
  return u.ctx.canvas.clientWidth > 0 ? u.ctx.canvas.width / u.ctx.canvas.clientWidth : 1;
}

/** A filled diamond centred on (cx, cy), canvas pixels: our mark for a resonance or a flagged point. */
export function fillDiamond(
  ctx: CanvasRenderingContext2D,
  cx: number,
  cy: number,
  halfWidth: number,
  halfHeight: number,
): void {
  ctx.beginPath();
  ctx.moveTo(cx, cy - halfHeight);
  ctx.lineTo(cx + halfWidth, cy);
  ctx.lineTo(cx, cy + halfHeight);
  ctx.lineTo(cx - halfWidth, cy);
  ctx.closePath();
  ctx.fill();
}

/** Vertical bands across the plot at x ranges, with a label at the top of each. */
export function drawXBands(
  u: uPlot,
  bands: { from: number; to: number; fill: string; label?: string }[],
  labels: boolean,
) {
  const { ctx, bbox } = u;
  const s = px(u);
  ctx.save();
  ctx.beginPath();
  ctx.rect(bbox.left, bbox.top, bbox.width, bbox.height);
  ctx.clip();
  for (const b of bands) {
    const x0 = u.valToPos(b.from, "x", true);
    const x1 = u.valToPos(b.to, "x", true);
    if (!labels) {
      ctx.fillStyle = b.fill;
      ctx.fillRect(x0, bbox.top, x1 - x0, bbox.height);
    } else if (b.label) {
      ctx.font = `500 ${11 * s}px ${FONT_FAMILY}`;
      const w = ctx.measureText(b.label).width;
      if (w + 8 * s < x1 - x0) {
        ctx.fillStyle = COLOURS.axis;
        ctx.textAlign = "left";
        ctx.textBaseline = "top";
        ctx.fillText(b.label, x0 + 4 * s, bbox.top + 4 * s);
      }
    }
  }
  ctx.restore();
}

/** Vertical marker lines (comments pinned to a time or speed) with their label. */
export function drawXMarkers(u: uPlot, markers: { at: number; label: string }[]) {
  const { ctx, bbox } = u;
  const s = px(u);
  const min = u.scales.x!.min!;
  const max = u.scales.x!.max!;
  ctx.save();
  ctx.strokeStyle = COLOURS.marker;
  ctx.fillStyle = COLOURS.marker;
  ctx.lineWidth = 1.25 * s;
  ctx.setLineDash([4 * s, 3 * s]);
  ctx.font = `${11 * s}px ${FONT_FAMILY}`;
  ctx.textAlign = "left";
  ctx.textBaseline = "top";
  markers.forEach((m, i) => {
    if (m.at < min || m.at > max) return;
    const x = u.valToPos(m.at, "x", true);
    ctx.beginPath();
    ctx.moveTo(x, bbox.top);
    ctx.lineTo(x, bbox.top + bbox.height);
    ctx.stroke();
    const text = m.label.length > 28 ? `${m.label.slice(0, 27)}…` : m.label;
    const w = ctx.measureText(text).width;
    const right = x + 4 * s + w < bbox.left + bbox.width;
    const y = bbox.top + (18 + (i % 3) * 14) * s;
    ctx.fillStyle = "rgba(255,255,255,0.85)";
    ctx.fillRect(right ? x + 2 * s : x - w - 6 * s, y - s, w + 4 * s, 13 * s);
    ctx.fillStyle = COLOURS.marker;
    ctx.fillText(text, right ? x + 4 * s : x - w - 4 * s, y);
  });
  ctx.restore();
}

/** A horizontal line at y (e.g. 0 dB or a limit), with an optional label at the right. */
export function drawYLine(
  u: uPlot,
  y: number,
  stroke: string,
  opts: { dash?: number[]; label?: string; scale?: string; width?: number } = {},
) {
  const { ctx, bbox } = u;
  const s = px(u);
  const scale = opts.scale ?? "y";
  const sc = u.scales[scale]!;
  if (sc.min == null || sc.max == null || y < sc.min || y > sc.max) return;
  const py = u.valToPos(y, scale, true);
  ctx.save();
  ctx.strokeStyle = stroke;
  ctx.lineWidth = (opts.width ?? 1.25) * s;
  ctx.setLineDash((opts.dash ?? []).map((d) => d * s));
  ctx.beginPath();
  ctx.moveTo(bbox.left, py);
  ctx.lineTo(bbox.left + bbox.width, py);
  ctx.stroke();
  if (opts.label) {
    ctx.font = `500 ${11 * s}px ${FONT_FAMILY}`;
    ctx.fillStyle = stroke;
    ctx.textAlign = "right";
    ctx.textBaseline = "bottom";
    ctx.fillText(opts.label, bbox.left + bbox.width - 4 * s, py - 2 * s);
  }
  ctx.restore();
}

/** y range from data plus lines that must stay visible (0 dB, targets, limits), padded 8 %. */
export function rangeWith(...keep: number[]): uPlot.Range.Function {
  return (_u, min, max) => {
    let lo = Math.min(min ?? 0, ...keep);
    let hi = Math.max(max ?? 1, ...keep);
    if (!Number.isFinite(lo) || !Number.isFinite(hi)) [lo, hi] = [0, 1];
    if (lo === hi) [lo, hi] = [lo - 1, hi + 1];
    const pad = (hi - lo) * 0.08;
    return [lo - pad, hi + pad];
  };
}

/** The data range of x, or ±halfSpan around a single value (a one-bin drive log). */
export function xRangeAround(halfSpan: number): uPlot.Range.Function {
  return (_u, min, max) =>
    min == null || max == null || min === max
      ? [(min ?? 0) - halfSpan, (max ?? 0) + halfSpan]
      : [min, max];
}

/** 0 to the data maximum plus 18 %: room at the top for the segment labels (speed trace). */
export const fromZeroWithHeadroom: uPlot.Range.Function = (_u, _min, max) => [
  0,
  max != null && Number.isFinite(max) && max > 0 ? max * 1.18 : 1,
];

/** 0 to the data maximum (plus 8 %): for amplitudes and speeds. */
export const fromZero: uPlot.Range.Function = (_u, _min, max) => [
  0,
  max != null && Number.isFinite(max) && max > 0 ? max * 1.08 : 1,
];

/**
 * Points measured by the order filter (start, stop and fast segments) get a hollow square around
 * their dot, so they read apart from the blocks' points without a second colour.
 */
export function drawFilterMarks(
  u: uPlot,
  xs: readonly number[],
  ys: readonly (number | null)[],
  filtered: readonly boolean[],
  stroke: string,
) {
  const { ctx } = u;
  const s = px(u);
  ctx.save();
  ctx.strokeStyle = stroke;
  ctx.lineWidth = 1.5 * s;
  xs.forEach((x, i) => {
    const y = ys[i];
    if (!filtered[i] || y === null || y === undefined) return;
    const cx = u.valToPos(x, "x", true);
    const cy = u.valToPos(y, "y", true);
    ctx.strokeRect(cx - 5 * s, cy - 5 * s, 10 * s, 10 * s);
  });
  ctx.restore();
}

/**
 * Engine starts and stops on a time axis: a light tint over each event and, near the top, a
 * pennant (a small flag on a staff: pointing right for a start, left for a stop) with its name.
 */
export function drawEventTints(u: uPlot, events: readonly { startS: number; endS: number }[]) {
  const { ctx, bbox } = u;
  ctx.save();
  ctx.beginPath();
  ctx.rect(bbox.left, bbox.top, bbox.width, bbox.height);
  ctx.clip();
  ctx.fillStyle = COLOURS.eventFill;
  for (const e of events) {
    const x0 = u.valToPos(e.startS, "x", true);
    const x1 = u.valToPos(e.endS, "x", true);
    ctx.fillRect(x0, bbox.top, Math.max(1, x1 - x0), bbox.height);
  }
  ctx.restore();
}

export function drawEventPennants(
  u: uPlot,
  events: readonly { kind: "start" | "stop"; startS: number; endS: number; label: string }[],
) {
  const { ctx, bbox } = u;
  const s = px(u);
  const min = u.scales.x!.min!;
  const max = u.scales.x!.max!;
  ctx.save();
  ctx.font = `500 ${11 * s}px ${FONT_FAMILY}`;
  ctx.textBaseline = "middle";
  for (const e of events) {
    const at = e.kind === "start" ? e.startS : e.endS;
    if (at < min || at > max) continue;
    const x = u.valToPos(at, "x", true);
    const top = bbox.top + 20 * s;
    const dir = e.kind === "start" ? 1 : -1;
    ctx.strokeStyle = COLOURS.event;
    ctx.fillStyle = COLOURS.event;
    ctx.lineWidth = 1.5 * s;
    ctx.beginPath();
    ctx.moveTo(x, top);
    ctx.lineTo(x, top + 22 * s);
    ctx.stroke();
    ctx.beginPath();
    ctx.moveTo(x, top);
    ctx.lineTo(x + dir * 10 * s, top + 4 * s);
    ctx.lineTo(x, top + 8 * s);
    ctx.closePath();
    ctx.fill();
    const w = ctx.measureText(e.label).width;
    // The name on the pennant's side, unless that side has no room for it.
    let side = dir;
    if (side > 0 && x + 14 * s + w > bbox.left + bbox.width) side = -1;
    if (side < 0 && x - 14 * s - w < bbox.left) side = 1;
    ctx.textAlign = side > 0 ? "left" : "right";
    ctx.fillStyle = "rgba(255,255,255,0.85)";
    const tx = x + side * 13 * s;
    ctx.fillRect(side > 0 ? tx - 2 * s : tx - w - 2 * s, top - 3 * s, w + 4 * s, 14 * s);
    ctx.fillStyle = COLOURS.event;
    ctx.fillText(e.label, tx, top + 4 * s);
  }
  ctx.restore();
}

/** The stretches the order filter measured: a thin bar along the foot of a time plot. */
export function drawFilterSpans(u: uPlot, spans: readonly { startS: number; endS: number }[]) {
  const { ctx, bbox } = u;
  const s = px(u);
  ctx.save();
  ctx.beginPath();
  ctx.rect(bbox.left, bbox.top, bbox.width, bbox.height);
  ctx.clip();
  ctx.fillStyle = COLOURS.event;
  for (const span of spans) {
    const x0 = u.valToPos(span.startS, "x", true);
    const x1 = u.valToPos(span.endS, "x", true);
    ctx.fillRect(x0, bbox.top + bbox.height - 4 * s, Math.max(s, x1 - x0), 4 * s);
  }
  ctx.restore();
}
