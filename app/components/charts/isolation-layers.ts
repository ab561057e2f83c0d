/**
 * What the isolation curve draws over its series, in order (uPlot's `draw` hook runs after the
 * series). The target labels come last, each on a white box, so no point, bound or marker ever
 * covers them; their places are chosen so two labels never overlap (placeLabels).
 */
import type uPlot from "uplot";
import type { ChartData } from "~/lib/chart-data";
import { dbText, rpmText } from "~/lib/format";
import { COLOURS, FONT_FAMILY } from "./palette";
import { drawXMarkers, drawYLine, px } from "./plot-kit";
import type { TargetBand } from "./types";

type Iso = ChartData["isolation"];
type Layer = (u: uPlot) => void;

export const LABEL_BOX = "rgba(255,255,255,0.9)";

export function targetLabel(b: TargetBand): string {
  return `${b.name}: at least ${dbText(b.minDb)}`;
}

/** The `draw` hook's layers, bottom to top. */
export function isolationLayers(
  iso: Iso,
  bands: TargetBand[],
  resonance: { rpm: number; isolationDb: number } | null,
  markers: { at: number; label: string }[],
): Layer[] {
  return [
    (u) => drawYLine(u, 0, COLOURS.zero, { label: "0 dB" }),
    (u) => drawTargetLines(u, bands),
    (u) => drawLowerBounds(u, iso),
    (u) => drawBelowTarget(u, iso, bands),
    (u) => resonance && drawResonance(u, resonance),
    (u) => drawXMarkers(u, markers),
    (u) => drawTargetLabels(u, bands),
  ];
}

/** The red fill below each target's minimum over its range (drawn before the series). */
export function drawTargetFills(u: uPlot, bands: TargetBand[]) {
  const { ctx, bbox } = u;
  const y = u.scales.y!;
  if (y.min == null || y.max == null) return;
  ctx.save();
  clipToPlot(u);
  ctx.fillStyle = COLOURS.failFill;
  for (const b of bands) {
    const x0 = u.valToPos(b.rpmFrom, "x", true);
    const x1 = u.valToPos(b.rpmTo, "x", true);
    const top = targetY(u, b);
    ctx.fillRect(x0, top, x1 - x0, bbox.top + bbox.height - top);
  }
  ctx.restore();
}

function targetY(u: uPlot, b: TargetBand): number {
  const y = u.scales.y!;
  return u.valToPos(Math.min(Math.max(b.minDb, y.min!), y.max!), "y", true);
}

function clipToPlot(u: uPlot) {
  const { ctx, bbox } = u;
  ctx.beginPath();
  ctx.rect(bbox.left, bbox.top, bbox.width, bbox.height);
  ctx.clip();
}

function drawTargetLines(u: uPlot, bands: TargetBand[]) {
  const { ctx } = u;
  const s = px(u);
  const y = u.scales.y!;
  if (y.min == null || y.max == null) return;
  ctx.save();
  clipToPlot(u);
  ctx.strokeStyle = COLOURS.fail;
  ctx.lineWidth = 1.5 * s;
  ctx.setLineDash([6 * s, 3 * s]);
  for (const b of bands) {
    const top = targetY(u, b);
    ctx.beginPath();
    ctx.moveTo(u.valToPos(b.rpmFrom, "x", true), top);
    ctx.lineTo(u.valToPos(b.rpmTo, "x", true), top);
    ctx.stroke();
  }
  ctx.restore();
}

export interface LabelBox {
  x: number;
  y: number;
  w: number;
  h: number;
}

/**
 * Places each label just under its target line, from the left edge of its range (or right-aligned
 * against the plot's right edge when it would run off), one line lower for as long as it would
 * overlap a label placed before it. Pure: canvas pixels in, boxes out.
 */
export function placeLabels(
  wanted: { x0: number; top: number; w: number }[],
  plot: { left: number; right: number; bottom: number },
  lineH: number,
  pad: number,
): LabelBox[] {
  const placed: LabelBox[] = [];
  for (const l of wanted) {
    const w = l.w + 2 * pad;
    let x = Math.max(plot.left, l.x0) + pad;
    if (x + w > plot.right - pad) x = Math.max(plot.left + pad, plot.right - pad - w);
    let y = l.top + pad;
    const hits = (b: LabelBox) => x < b.x + b.w && b.x < x + w && y < b.y + b.h && b.y < y + lineH;
    for (let guard = 0; placed.some(hits) && guard < 20; guard++) y += lineH;
    // Near the bottom of the plot, above the line instead.
    if (y + lineH > plot.bottom) y = Math.max(0, l.top - pad - lineH);
    placed.push({ x, y, w, h: lineH });
  }
  return placed;
}

function drawTargetLabels(u: uPlot, bands: TargetBand[]) {
  const y = u.scales.y!;
  if (!bands.length || y.min == null || y.max == null) return;
  const { ctx, bbox } = u;
  const s = px(u);
  ctx.save();
  clipToPlot(u);
  ctx.font = `500 ${11 * s}px ${FONT_FAMILY}`;
  const texts = bands.map(targetLabel);
  const boxes = placeLabels(
    bands.map((b, i) => ({
      x0: u.valToPos(b.rpmFrom, "x", true),
      top: targetY(u, b),
      w: ctx.measureText(texts[i]!).width,
    })),
    { left: bbox.left, right: bbox.left + bbox.width, bottom: bbox.top + bbox.height },
    15 * s,
    3 * s,
  );
  ctx.textAlign = "left";
  ctx.textBaseline = "middle";
  boxes.forEach((box, i) => {
    ctx.fillStyle = LABEL_BOX;
    ctx.fillRect(box.x, box.y, box.w, box.h);
    ctx.fillStyle = COLOURS.fail;
    ctx.fillText(texts[i]!, box.x + 3 * s, box.y + box.h / 2);
  });
  ctx.restore();
}

/** Lower-bound points: a hollow ring with a caret above (the true value lies higher). */
function drawLowerBounds(u: uPlot, iso: Iso) {
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

function drawBelowTarget(u: uPlot, iso: Iso, bands: TargetBand[]) {
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
  const text = `Resonance ${rpmText(r.rpm)}, ${dbText(r.isolationDb)}`;
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
