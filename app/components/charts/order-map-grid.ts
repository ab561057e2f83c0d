/**
 * The order maps' grid (rows of engine speed or time × orders) and its geometry in pixels, with
 * the texts drawn from it: the readout, the summary for screen readers and the CSV table. Pure;
 * ./order-map renders it and ./order-map-draw paints it on the canvas.
 */
import type { ChartData } from "~/lib/domain/chart-data";
import { amplitudeDb } from "~/lib/domain/chart-units";
import {
  amplitudeNumber,
  amplitudeText,
  dbNumber,
  dbText,
  orderNumber,
  rpmText,
  secondsText,
} from "~/lib/domain/format";
import { nearestIndex } from "./chart-math";
import type { LevelScale } from "./colour-scale";

export const ORDER_MAP_HEIGHT = 300;
/** Below this many engine-speed rows the maps are drawn against time instead. */
export const MIN_SPEED_ROWS = 4;
/** Room around the cells for the axes (left, bottom) and the colour bar (right), px. */
export const MARGIN = { left: 52, right: 78, top: 8, bottom: 40 };

export interface MapGrid {
  /** Row centres: engine speed (rpm) or time (s). */
  rows: number[];
  edges: [number, number][];
  /** Mean engine speed of each row, rpm (time mode), for the readout. */
  rowRpm: number[];
  cells: number[][];
  byTime: boolean;
}

export type MapSide = "crankRpm" | "gearboxRpm";

export function rpmGrid(map: ChartData["orderMap"], side: MapSide): MapGrid {
  return {
    rows: map.rpm,
    edges: map.rpm.map((r) => [r - map.rowRpm / 2, r + map.rowRpm / 2]),
    rowRpm: map.rpm,
    cells: map[side],
    byTime: false,
  };
}

export function timeGrid(map: ChartData["orderMapByTime"], side: MapSide): MapGrid {
  const t = map.timeS;
  const edges = t.map((v, i): [number, number] => {
    const before = i > 0 ? (v + t[i - 1]!) / 2 : v - ((t[1] ?? v + 1) - v) / 2;
    const after = i < t.length - 1 ? (v + t[i + 1]!) / 2 : v + (v - (t[i - 1] ?? v - 1)) / 2;
    return [before, after];
  });
  return { rows: t, edges, rowRpm: map.rowEngineRpm, cells: map[side], byTime: true };
}

/** Where the cells lie: data ranges (x: rpm or s, y: order) and the maps to pixels. */
export interface MapGeometry {
  x0: number;
  x1: number;
  y0: number;
  y1: number;
  w: number;
  h: number;
  toX: (v: number) => number;
  toY: (o: number) => number;
}

export function mapGeometry(
  grid: MapGrid | null,
  width: number,
  step: number,
  count: number,
): MapGeometry | null {
  if (!grid || !grid.rows.length || width <= 0) return null;
  const x0 = grid.edges[0]![0];
  const x1 = grid.edges[grid.edges.length - 1]![1];
  const y0 = -step / 2;
  const y1 = (count - 0.5) * step;
  const w = width - MARGIN.left - MARGIN.right;
  const h = ORDER_MAP_HEIGHT - MARGIN.top - MARGIN.bottom;
  return {
    x0,
    x1,
    y0,
    y1,
    w,
    h,
    toX: (v: number) => MARGIN.left + ((v - x0) / (x1 - x0 || 1)) * w,
    toY: (o: number) => MARGIN.top + h - ((o - y0) / (y1 - y0 || 1)) * h,
  };
}

/** The cell under a point of the canvas (px from its top left corner), or null outside the cells. */
export function cellAt(
  grid: MapGrid,
  g: MapGeometry,
  x: number,
  y: number,
  step: number,
  count: number,
) {
  if (x < MARGIN.left || x > MARGIN.left + g.w || y < MARGIN.top || y > MARGIN.top + g.h)
    return null;
  const v = g.x0 + ((x - MARGIN.left) / g.w) * (g.x1 - g.x0);
  const row = nearestIndex(grid.rows, v);
  if (row < 0 || v < grid.edges[row]![0] || v > grid.edges[row]![1]) return null;
  const o = g.y0 + ((MARGIN.top + g.h - y) / g.h) * (g.y1 - g.y0);
  const k = Math.min(count - 1, Math.max(0, Math.round(o / step)));
  return { row, k };
}

/** The frame around one cell, px (at least 4 px a side, so a thin cell still shows it). */
export function cellBox(grid: MapGrid, g: MapGeometry, row: number, k: number, step: number) {
  const [a, b] = grid.edges[row]!;
  return {
    left: g.toX(a) - 1,
    width: Math.max(4, g.toX(b) - g.toX(a) + 2),
    top: g.toY((k + 0.5) * step) - 1,
    height: Math.max(4, g.toY((k - 0.5) * step) - g.toY((k + 0.5) * step) + 2),
  };
}

/** "0 to 42.3 rpm" or "−20.0 to 32.5 dB re 1 rpm": each end by the rule of its quantity. */
export function scaleText(scale: { min: number; max: number; unit: string }): string {
  const n = scale.unit.startsWith("dB") ? dbNumber : amplitudeNumber;
  return `${n(scale.min)} to ${n(scale.max)} ${scale.unit}`;
}

/** The readout of one cell: where it is, its order and its amplitude. */
export function cellText(grid: MapGrid, side: string, row: number, k: number, step: number) {
  const cell = grid.cells[row]?.[k];
  if (cell === undefined) return undefined;
  const where = grid.byTime
    ? `${secondsText(grid.rows[row])} (${rpmText(grid.rowRpm[row])})`
    : rpmText(grid.rows[row]);
  return `${side} · ${where} · order ${orderNumber(k * step)}: ${amplitudeText(cell, "rpm")} (${cell > 0 ? `${dbText(amplitudeDb(cell))} re 1 rpm` : "no level"})`;
}

/** The text alternative of one map: its rows, orders, the largest cell and the colour scale. */
export function mapSummary(
  title: string,
  grid: MapGrid,
  scale: LevelScale,
  step: number,
  count: number,
) {
  let best = { row: 0, k: 0, v: -1 };
  grid.cells.forEach((r, i) => r.forEach((v, k) => v > best.v && (best = { row: i, k, v })));
  const at = (v: number | undefined) => (grid.byTime ? secondsText(v) : rpmText(v));
  return `${title}: ${grid.rows.length} ${grid.byTime ? "time" : "engine-speed"} rows from ${at(grid.rows[0])} to ${at(grid.rows[grid.rows.length - 1])}, orders 0 to ${orderNumber((count - 1) * step)}. Largest amplitude ${amplitudeText(best.v, "rpm")} at order ${orderNumber(best.k * step)}, ${at(grid.rows[best.row])}. Colour scale ${scaleText(scale)}.`;
}

/** The map as a table: one row per engine speed (or time), one column per order, rpm. */
export function mapTable(grid: MapGrid, step: number, count: number) {
  const orders = Array.from({ length: count }, (_, k) => k * step);
  const lead = grid.byTime ? ["time (s)", "engine speed (rpm)"] : ["engine speed (rpm)"];
  const header = [...lead, ...orders.map((o) => `order ${o} (rpm)`)];
  const rows = grid.rows.map((r, i) => [
    ...(grid.byTime ? [r, grid.rowRpm[i]] : [r]),
    ...orders.map((_, k) => grid.cells[i]![k]),
  ]);
  return { header, rows };
}
