/**
 * Paints one order map on a 2D canvas: the cells in the viridis ramp, the axes (engine speed or
 * time, order) and the colour bar with its level ticks. The geometry comes from ./order-map-grid.
 */
import { formatValue, niceTicks } from "./chart-math";
import { rgbCss, viridis, type LevelScale } from "./colour-scale";
import { MARGIN, ORDER_MAP_HEIGHT, type MapGeometry, type MapGrid } from "./order-map-grid";
import { COLOURS, FONT_FAMILY } from "./palette";

export function drawMap(
  ctx: CanvasRenderingContext2D,
  grid: MapGrid,
  g: MapGeometry,
  scale: LevelScale,
  step: number,
  count: number,
  xLabel: string,
  width: number,
) {
  ctx.clearRect(0, 0, width, ORDER_MAP_HEIGHT);
  ctx.fillStyle = COLOURS.bandA;
  ctx.fillRect(MARGIN.left, MARGIN.top, g.w, g.h);
  // Cells: each row spans its own edges; columns are orders k·step ± step/2. Overlap by a
  // fraction of a pixel so no hairline gaps show between neighbours.
  grid.cells.forEach((row, i) => {
    const [a, b] = grid.edges[i]!;
    const xa = g.toX(a);
    const xb = g.toX(b);
    for (let k = 0; k < count; k++) {
      const ya = g.toY((k + 0.5) * step);
      const yb = g.toY((k - 0.5) * step);
      ctx.fillStyle = rgbCss(viridis(scale.position(row[k] ?? 0)));
      ctx.fillRect(xa, ya, xb - xa + 0.5, yb - ya + 0.5);
    }
  });
  ctx.font = `12px ${FONT_FAMILY}`;
  ctx.fillStyle = COLOURS.axis;
  ctx.strokeStyle = COLOURS.axis;
  ctx.lineWidth = 1;
  // x axis
  ctx.textAlign = "center";
  ctx.textBaseline = "top";
  for (const t of niceTicks(g.x0, g.x1, Math.max(2, Math.floor(g.w / 80)))) {
    if (t < g.x0 || t > g.x1) continue;
    const x = g.toX(t);
    ctx.beginPath();
    ctx.moveTo(x, MARGIN.top + g.h);
    ctx.lineTo(x, MARGIN.top + g.h + 4);
    ctx.stroke();
    ctx.fillText(formatValue(t, 6), x, MARGIN.top + g.h + 6);
  }
  ctx.font = `500 12px ${FONT_FAMILY}`;
  ctx.fillText(xLabel, MARGIN.left + g.w / 2, MARGIN.top + g.h + 22);
  // y axis (orders)
  ctx.font = `12px ${FONT_FAMILY}`;
  ctx.textAlign = "right";
  ctx.textBaseline = "middle";
  for (const t of niceTicks(0, (count - 1) * step, Math.max(2, Math.floor(g.h / 32)))) {
    const y = g.toY(t);
    ctx.beginPath();
    ctx.moveTo(MARGIN.left - 4, y);
    ctx.lineTo(MARGIN.left, y);
    ctx.stroke();
    ctx.fillText(formatValue(t, 6), MARGIN.left - 6, y);
  }
  ctx.save();
  ctx.translate(14, MARGIN.top + g.h / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = "center";
  ctx.font = `500 12px ${FONT_FAMILY}`;
  ctx.fillText("Order", 0, 0);
  ctx.restore();
  // colour bar
  const bx = MARGIN.left + g.w + 14;
  const bw = 12;
  const n = Math.max(2, Math.round(g.h));
  for (let i = 0; i < n; i++) {
    ctx.fillStyle = rgbCss(viridis(1 - i / (n - 1)));
    ctx.fillRect(bx, MARGIN.top + (i * g.h) / n, bw, g.h / n + 0.5);
  }
  ctx.strokeStyle = COLOURS.grid;
  ctx.strokeRect(bx, MARGIN.top, bw, g.h);
  ctx.fillStyle = COLOURS.axis;
  ctx.strokeStyle = COLOURS.axis;
  ctx.textAlign = "left";
  ctx.textBaseline = "middle";
  const span = scale.max - scale.min || 1;
  for (const t of niceTicks(scale.min, scale.max, 5)) {
    const y = MARGIN.top + g.h - ((t - scale.min) / span) * g.h;
    ctx.beginPath();
    ctx.moveTo(bx + bw, y);
    ctx.lineTo(bx + bw + 3, y);
    ctx.stroke();
    ctx.fillText(formatValue(t, 6), bx + bw + 5, y);
  }
  ctx.save();
  ctx.translate(width - 8, MARGIN.top + g.h / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = "center";
  ctx.font = `500 12px ${FONT_FAMILY}`;
  ctx.fillText(scale.mode === "dB" ? "Amplitude, dB re 1 rpm" : "Amplitude, rpm", 0, 0);
  ctx.restore();
}
