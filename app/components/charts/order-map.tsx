/**
 * The order maps: amplitude over engine speed (or time) × order as colour on a plain canvas
 * (uPlot has no heat map), crank side and gearbox input side by side on one shared level scale.
 */
import { memo, useEffect, useId, useMemo, useRef, useState } from "react";
import type { ChartData } from "~/lib/domain/chart-data";
import { amplitudeDb } from "~/lib/domain/chart-units";
import { formatValue, nearestIndex, niceTicks } from "./chart-math";
import {
  amplitudeNumber,
  amplitudeText,
  dbNumber,
  dbText,
  orderNumber,
  rpmText,
  secondsText,
} from "~/lib/domain/format";

/** "0 to 42.3 rpm" or "−20.0 to 32.5 dB re 1 rpm": each end by the rule of its quantity. */
function scaleText(scale: { min: number; max: number; unit: string }): string {
  const n = scale.unit.startsWith("dB") ? dbNumber : amplitudeNumber;
  return `${n(scale.min)} to ${n(scale.max)} ${scale.unit}`;
}
import { ChartFrame, Segmented } from "./chart-frame";
import {
  levelScale,
  mapMaximum,
  rgbCss,
  viridis,
  type LevelMode,
  type LevelScale,
} from "./colour-scale";
import { buildCsv } from "./csv";
import { downloadCsv, downloadPng } from "./download";
import { useExportContext } from "./export-context";
import { COLOURS, FONT_FAMILY } from "./palette";

export const ORDER_MAP_HEIGHT = 300;
/** Below this many engine-speed rows the maps are drawn against time instead. */
export const MIN_SPEED_ROWS = 4;
const M = { left: 52, right: 78, top: 8, bottom: 40 };

interface MapGrid {
  /** Row centres: engine speed (rpm) or time (s). */
  rows: number[];
  edges: [number, number][];
  /** Mean engine speed of each row, rpm (time mode), for the readout. */
  rowRpm: number[];
  cells: number[][];
  byTime: boolean;
}

function rpmGrid(map: ChartData["orderMap"], side: "crankRpm" | "gearboxRpm"): MapGrid {
  return {
    rows: map.rpm,
    edges: map.rpm.map((r) => [r - map.rowRpm / 2, r + map.rowRpm / 2]),
    rowRpm: map.rpm,
    cells: map[side],
    byTime: false,
  };
}

function timeGrid(map: ChartData["orderMapByTime"], side: "crankRpm" | "gearboxRpm"): MapGrid {
  const t = map.timeS;
  const edges = t.map((v, i): [number, number] => {
    const before = i > 0 ? (v + t[i - 1]!) / 2 : v - ((t[1] ?? v + 1) - v) / 2;
    const after = i < t.length - 1 ? (v + t[i + 1]!) / 2 : v + (v - (t[i - 1] ?? v - 1)) / 2;
    return [before, after];
  });
  return { rows: t, edges, rowRpm: map.rowEngineRpm, cells: map[side], byTime: true };
}

export const OrderMaps = memo(function OrderMaps({
  charts,
  cursorRpm,
  fileSuffix,
}: {
  charts: ChartData | null;
  /** The shared engine-speed cursor, drawn as a line on the maps. */
  cursorRpm?: number | null;
  fileSuffix?: string;
}) {
  const [mode, setMode] = useState<LevelMode>("dB");
  const byTime = charts ? charts.orderMap.rpm.length < MIN_SPEED_ROWS : false;
  const grids = useMemo(() => {
    if (!charts) return null;
    return byTime
      ? [timeGrid(charts.orderMapByTime, "crankRpm"), timeGrid(charts.orderMapByTime, "gearboxRpm")]
      : [rpmGrid(charts.orderMap, "crankRpm"), rpmGrid(charts.orderMap, "gearboxRpm")];
  }, [charts, byTime]);
  const scale = useMemo(
    () =>
      levelScale(
        mode,
        grids && charts
          ? mapMaximum(
              [grids[0]!.cells, grids[1]!.cells],
              Math.round(0.5 / charts.orderMap.orderStep),
            )
          : 1,
      ),
    [mode, grids, charts],
  );
  return (
    <div className="space-y-3">
      {/* Room for two lines of the note, so the maps do not move when it grows (time mode). */}
      <div className="flex min-h-14 flex-wrap items-center gap-x-6 gap-y-2">
        <Segmented
          legend="Order-map colour scale"
          value={mode}
          disabled={!charts}
          options={[
            { value: "dB", label: "dB re 1 rpm" },
            { value: "linear", label: "linear, rpm" },
          ]}
          onChange={setMode}
        />
        <p className="text-xs text-neutral-600">
          {byTime
            ? "This drive log stays near one engine speed, so the maps show time × order. "
            : ""}
          Both maps share one colour scale
          {mode === "dB" ? `: 20·log10(A / 1 rpm), ${scale.max - scale.min} dB range` : ""}, topped
          by the largest amplitude from order 0.5 up (lower orders, mostly the speed change of a
          run-up, may saturate).
        </p>
      </div>
      <div className="grid gap-6 lg:grid-cols-2">
        <HeatMap
          chart="order-map-crank"
          title="Order map — crank side"
          side="Crank side"
          grid={grids?.[0] ?? null}
          charts={charts}
          scale={scale}
          cursorRpm={byTime ? null : (cursorRpm ?? null)}
          fileSuffix={fileSuffix}
        />
        <HeatMap
          chart="order-map-gearbox"
          title="Order map — gearbox input"
          side="Gearbox input"
          grid={grids?.[1] ?? null}
          charts={charts}
          scale={scale}
          cursorRpm={byTime ? null : (cursorRpm ?? null)}
          fileSuffix={fileSuffix}
        />
      </div>
    </div>
  );
});

function HeatMap({
  chart,
  title,
  side,
  grid,
  charts,
  scale,
  cursorRpm,
  fileSuffix,
}: {
  chart: string;
  title: string;
  side: string;
  grid: MapGrid | null;
  charts: ChartData | null;
  scale: LevelScale;
  cursorRpm: number | null;
  fileSuffix?: string;
}) {
  const exportContext = useExportContext();
  const status =
    !charts || !grid
      ? "loading"
      : grid.rows.length && charts.orderMap.orderCount
        ? "ready"
        : "empty";
  const [hover, setHover] = useState<{ row: number; k: number } | null>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const [width, setWidth] = useState(0);
  const box = useRef<HTMLDivElement>(null);
  const hintId = useId();
  const step = charts?.orderMap.orderStep ?? 1;
  const count = charts?.orderMap.orderCount ?? 0;
  const xLabel = grid?.byTime ? "Time, s" : "Engine speed, rpm";

  useEffect(() => {
    const el = box.current;
    if (!el) return;
    setWidth(el.clientWidth);
    const observer = new ResizeObserver(() => setWidth(el.clientWidth));
    observer.observe(el);
    return () => observer.disconnect();
  }, [status]);

  const geometry = useMemo(() => {
    if (!grid || !grid.rows.length || width <= 0) return null;
    const x0 = grid.edges[0]![0];
    const x1 = grid.edges[grid.edges.length - 1]![1];
    const y0 = -step / 2;
    const y1 = (count - 0.5) * step;
    const w = width - M.left - M.right;
    const h = ORDER_MAP_HEIGHT - M.top - M.bottom;
    return {
      x0,
      x1,
      y0,
      y1,
      w,
      h,
      toX: (v: number) => M.left + ((v - x0) / (x1 - x0 || 1)) * w,
      toY: (o: number) => M.top + h - ((o - y0) / (y1 - y0 || 1)) * h,
    };
  }, [grid, width, step, count]);

  useEffect(() => {
    const el = canvas.current;
    if (!el || !grid || !geometry) return;
    const dpr = window.devicePixelRatio || 1;
    el.width = Math.round(width * dpr);
    el.height = Math.round(ORDER_MAP_HEIGHT * dpr);
    const ctx = el.getContext("2d")!;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    drawMap(ctx, grid, geometry, scale, step, count, xLabel, width);
  }, [grid, geometry, scale, step, count, xLabel, width]);

  function cellAt(clientX: number, clientY: number) {
    if (!grid || !geometry || !canvas.current) return null;
    const r = canvas.current.getBoundingClientRect();
    const x = clientX - r.left;
    const y = clientY - r.top;
    if (x < M.left || x > M.left + geometry.w || y < M.top || y > M.top + geometry.h) return null;
    const v = geometry.x0 + ((x - M.left) / geometry.w) * (geometry.x1 - geometry.x0);
    const row = nearestIndex(grid.rows, v);
    if (row < 0 || v < grid.edges[row]![0] || v > grid.edges[row]![1]) return null;
    const o = geometry.y0 + ((M.top + geometry.h - y) / geometry.h) * (geometry.y1 - geometry.y0);
    const k = Math.min(count - 1, Math.max(0, Math.round(o / step)));
    return { row, k };
  }

  function onKey(e: React.KeyboardEvent) {
    if (!grid || !charts) return;
    const start = hover ?? {
      row: Math.max(
        0,
        nearestIndex(grid.rows, grid.byTime ? grid.rows[0]! : (cursorRpm ?? grid.rows[0]!)),
      ),
      k: Math.round(charts.firingOrder / step),
    };
    const moves: Record<string, [number, number]> = {
      ArrowLeft: [-1, 0],
      ArrowRight: [1, 0],
      ArrowUp: [0, 1],
      ArrowDown: [0, -1],
    };
    if (e.key === "Escape") return setHover(null);
    const m = moves[e.key];
    if (!m) return;
    e.preventDefault();
    const fresh = !hover;
    setHover({
      row: Math.min(grid.rows.length - 1, Math.max(0, start.row + (fresh ? 0 : m[0]))),
      k: Math.min(count - 1, Math.max(0, start.k + (fresh ? 0 : m[1]))),
    });
  }

  const cell = hover && grid ? grid.cells[hover.row]?.[hover.k] : undefined;
  const readout =
    hover && grid && cell !== undefined
      ? `${side} · ${grid.byTime ? `${secondsText(grid.rows[hover.row])} (${rpmText(grid.rowRpm[hover.row])})` : rpmText(grid.rows[hover.row])} · order ${orderNumber(hover.k * step)}: ${amplitudeText(cell, "rpm")} (${cell > 0 ? `${dbText(amplitudeDb(cell))} re 1 rpm` : "no level"})`
      : "Point at a cell, or focus the map and use the arrow keys, to read its amplitude.";

  let summary: string | undefined;
  if (status === "ready" && grid && charts) {
    let best = { row: 0, k: 0, v: -1 };
    grid.cells.forEach((r, i) => r.forEach((v, k) => v > best.v && (best = { row: i, k, v })));
    const at = (v: number | undefined) => (grid.byTime ? secondsText(v) : rpmText(v));
    summary = `${title}: ${grid.rows.length} ${grid.byTime ? "time" : "engine-speed"} rows from ${at(grid.rows[0])} to ${at(grid.rows[grid.rows.length - 1])}, orders 0 to ${orderNumber((count - 1) * step)}. Largest amplitude ${amplitudeText(best.v, "rpm")} at order ${orderNumber(best.k * step)}, ${at(grid.rows[best.row])}. Colour scale ${scaleText(scale)}.`;
  }

  function csv() {
    if (!grid || !charts) return;
    const orders = Array.from({ length: count }, (_, k) => k * step);
    const lead = grid.byTime ? ["time (s)", "engine speed (rpm)"] : ["engine speed (rpm)"];
    const header = [...lead, ...orders.map((o) => `order ${o} (rpm)`)];
    const rows = grid.rows.map((r, i) => [
      ...(grid.byTime ? [r, grid.rowRpm[i]] : [r]),
      ...orders.map((_, k) => grid.cells[i]![k]),
    ]);
    downloadCsv(title, buildCsv(header, rows), fileSuffix);
  }

  const legendLine = `Colour: amplitude, ${scale.unit} (${scale.mode === "dB" ? "20·log10(A / 1 rpm)" : "linear"}); viridis colour ramp`;
  const hoverBox =
    hover && grid && geometry ? (
      <div
        aria-hidden="true"
        className="pointer-events-none absolute border-2 border-white outline outline-1 outline-neutral-900"
        style={{
          left: geometry.toX(grid.edges[hover.row]![0]) - 1,
          width: Math.max(
            4,
            geometry.toX(grid.edges[hover.row]![1]) - geometry.toX(grid.edges[hover.row]![0]) + 2,
          ),
          top: geometry.toY((hover.k + 0.5) * step) - 1,
          height: Math.max(
            4,
            geometry.toY((hover.k - 0.5) * step) - geometry.toY((hover.k + 0.5) * step) + 2,
          ),
        }}
      />
    ) : null;
  const cursorLine =
    cursorRpm !== null && geometry && cursorRpm >= geometry.x0 && cursorRpm <= geometry.x1 ? (
      <div
        aria-hidden="true"
        className="pointer-events-none absolute border-l border-dashed border-white"
        style={{ left: geometry.toX(cursorRpm), top: M.top, height: geometry.h }}
      />
    ) : null;

  return (
    <ChartFrame
      chart={chart}
      title={title}
      height={ORDER_MAP_HEIGHT}
      status={status}
      attrs={{ "data-axis": grid?.byTime ? "time" : "engine-speed", "data-scale": scale.mode }}
      emptyMessage="No blocks to draw the order map from: the drive log may be too short or too slow. Re-analyse with fewer revolutions per block to get more."
      legend={[]}
      readout={readout}
      summary={summary}
      onCsv={csv}
      onPng={() =>
        canvas.current &&
        void downloadPng(
          title,
          canvas.current,
          [{ kind: "area", label: legendLine, colour: rgbCss(viridis(0.6)) }],
          fileSuffix,
          exportContext,
        )
      }
    >
      {(summaryId) => (
        <div ref={box} className="relative h-full w-full" onMouseLeave={() => setHover(null)}>
          <canvas
            ref={canvas}
            role="img"
            tabIndex={0}
            aria-label={`${title}: amplitude by ${grid?.byTime ? "time" : "engine speed"} and order, colour scale ${scaleText(scale)}. Arrow keys move between cells.`}
            aria-describedby={`${summaryId} ${hintId}`}
            onMouseMove={(e) => setHover(cellAt(e.clientX, e.clientY))}
            onKeyDown={onKey}
            onBlur={() => setHover(null)}
            style={{ width: "100%", height: ORDER_MAP_HEIGHT }}
            className="block rounded-sm focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600"
          />
          <span id={hintId} className="sr-only">
            {legendLine}.
          </span>
          {cursorLine}
          {hoverBox}
        </div>
      )}
    </ChartFrame>
  );
}

function drawMap(
  ctx: CanvasRenderingContext2D,
  grid: MapGrid,
  g: {
    x0: number;
    x1: number;
    y0: number;
    y1: number;
    w: number;
    h: number;
    toX: (v: number) => number;
    toY: (o: number) => number;
  },
  scale: LevelScale,
  step: number,
  count: number,
  xLabel: string,
  width: number,
) {
  ctx.clearRect(0, 0, width, ORDER_MAP_HEIGHT);
  ctx.fillStyle = COLOURS.bandA;
  ctx.fillRect(M.left, M.top, g.w, g.h);
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
    ctx.moveTo(x, M.top + g.h);
    ctx.lineTo(x, M.top + g.h + 4);
    ctx.stroke();
    ctx.fillText(formatValue(t, 6), x, M.top + g.h + 6);
  }
  ctx.font = `500 12px ${FONT_FAMILY}`;
  ctx.fillText(xLabel, M.left + g.w / 2, M.top + g.h + 22);
  // y axis (orders)
  ctx.font = `12px ${FONT_FAMILY}`;
  ctx.textAlign = "right";
  ctx.textBaseline = "middle";
  for (const t of niceTicks(0, (count - 1) * step, Math.max(2, Math.floor(g.h / 32)))) {
    const y = g.toY(t);
    ctx.beginPath();
    ctx.moveTo(M.left - 4, y);
    ctx.lineTo(M.left, y);
    ctx.stroke();
    ctx.fillText(formatValue(t, 6), M.left - 6, y);
  }
  ctx.save();
  ctx.translate(14, M.top + g.h / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = "center";
  ctx.font = `500 12px ${FONT_FAMILY}`;
  ctx.fillText("Order", 0, 0);
  ctx.restore();
  // colour bar
  const bx = M.left + g.w + 14;
  const bw = 12;
  const n = Math.max(2, Math.round(g.h));
  for (let i = 0; i < n; i++) {
    ctx.fillStyle = rgbCss(viridis(1 - i / (n - 1)));
    ctx.fillRect(bx, M.top + (i * g.h) / n, bw, g.h / n + 0.5);
  }
  ctx.strokeStyle = COLOURS.grid;
  ctx.strokeRect(bx, M.top, bw, g.h);
  ctx.fillStyle = COLOURS.axis;
  ctx.strokeStyle = COLOURS.axis;
  ctx.textAlign = "left";
  ctx.textBaseline = "middle";
  const span = scale.max - scale.min || 1;
  for (const t of niceTicks(scale.min, scale.max, 5)) {
    const y = M.top + g.h - ((t - scale.min) / span) * g.h;
    ctx.beginPath();
    ctx.moveTo(bx + bw, y);
    ctx.lineTo(bx + bw + 3, y);
    ctx.stroke();
    ctx.fillText(formatValue(t, 6), bx + bw + 5, y);
  }
  ctx.save();
  ctx.translate(width - 8, M.top + g.h / 2);
  ctx.rotate(-Math.PI / 2);
  ctx.textAlign = "center";
  ctx.font = `500 12px ${FONT_FAMILY}`;
  ctx.fillText(scale.mode === "dB" ? "Amplitude, dB re 1 rpm" : "Amplitude, rpm", 0, 0);
  ctx.restore();
}
