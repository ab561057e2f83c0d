/**
 * What the isolation curve draws over its series, in order (uPlot's `draw` hook runs after the
 * series). The target labels come last, each on a white box, so no point, bound or marker ever
 * covers them; placeLabels puts them where they cover no point and no other label if it can.
 */
import type uPlot from "uplot";
import type { ChartData } from "~/lib/domain/chart-data";
import { dbText, rpmText } from "~/lib/domain/format";
import { COLOURS, FONT_FAMILY } from "./palette";
import { drawFilterMarks, drawXMarkers, drawYLine, fillDiamond, px } from "./plot-kit";
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
    (u) =>
      drawFilterMarks(
        u,
        iso.rpm,
        iso.dB,
        iso.method.map((m) => m === "filter"),
        COLOURS.isolation,
      ),
    (u) => drawXMarkers(u, markers),
    (u) => drawTargetLabels(u, iso, bands),
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
 * Places each label by its target line, inside the plot, where it covers no data point and no
 * label placed before it. Tried in order: right under the line (from the range's left edge
 * towards its right end), right above it (the same), then one and two lines further away. When
 * every place covers a point, right under the line from the left (its white box keeps it
 * legible). Pure: canvas pixels in, boxes out.
 */
export function placeLabels(
  wanted: { x0: number; x1: number; top: number; w: number }[],
  plot: { left: number; right: number; top: number; bottom: number },
  points: readonly { x: number; y: number }[],
  lineH: number,
  pad: number,
  pointR = 4,
): LabelBox[] {
  const placed: LabelBox[] = [];
  const overlaps = (a: LabelBox, b: LabelBox) =>
    a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
  const coversPoint = (b: LabelBox) =>
    points.some(
      (p) =>
        p.x + pointR > b.x &&
        p.x - pointR < b.x + b.w &&
        p.y + pointR > b.y &&
        p.y - pointR < b.y + b.h,
    );
  for (const l of wanted) {
    const w = l.w + 2 * pad;
    const inside = (x: number) => Math.min(Math.max(x, plot.left + pad), plot.right - pad - w);
    const start = inside(Math.max(plot.left, l.x0) + pad);
    const end = Math.max(start, inside(Math.min(plot.right, l.x1) - pad - w));
    const xs = [0, 1, 2, 3, 4].map((k) => start + ((end - start) * k) / 4);
    const candidates: LabelBox[] = [];
    for (const away of [0, 1, 2])
      for (const y of [l.top + pad + away * lineH, l.top - pad - (away + 1) * lineH])
        for (const x of xs)
          if (y >= plot.top && y + lineH <= plot.bottom) candidates.push({ x, y, w, h: lineH });
    if (!candidates.length)
      candidates.push({ x: start, y: Math.max(plot.top, l.top - pad - lineH), w, h: lineH });
    const free = (b: LabelBox) => !placed.some((q) => overlaps(b, q));
    let box = candidates.find((b) => free(b) && !coversPoint(b)) ?? candidates.find(free);
    // Every place is taken by another label: one line lower until it is free.
    if (!box) {
      box = { ...candidates[0]! };
      for (let guard = 0; !free(box) && guard < 20; guard++) box.y += lineH;
    }
    placed.push(box);
  }
  return placed;
}

function drawTargetLabels(u: uPlot, iso: Iso, bands: TargetBand[]) {
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
      x1: u.valToPos(b.rpmTo, "x", true),
      top: targetY(u, b),
      w: ctx.measureText(texts[i]!).width,
    })),
    {
      left: bbox.left,
      right: bbox.left + bbox.width,
      top: bbox.top,
      bottom: bbox.top + bbox.height,
    },
    iso.rpm.map((rpm, i) => ({
      x: u.valToPos(rpm, "x", true),
      y: u.valToPos(iso.dB[i]!, "y", true),
    })),
    15 * s,
    3 * s,
    4 * s,
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
  fillDiamond(ctx, x, y, 6 * s, 7 * s);
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
