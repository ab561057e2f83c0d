/**
 * The order maps: amplitude over engine speed (or time) × order as colour on a plain canvas
 * (uPlot has no heat map), crank side and gearbox input side by side on one shared level scale.
 */
import { memo, useEffect, useId, useMemo, useRef, useState } from "react";
import type { ChartData } from "~/lib/domain/chart-data";
import { ChartFrame, Segmented } from "./chart-frame";
import { nearestIndex } from "./chart-math";
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
import { drawMap } from "./order-map-draw";
import {
  cellAt,
  cellBox,
  cellText,
  mapGeometry,
  mapSummary,
  mapTable,
  MARGIN,
  MIN_SPEED_ROWS,
  ORDER_MAP_HEIGHT,
  rpmGrid,
  scaleText,
  timeGrid,
  type MapGrid,
  type MapSide,
} from "./order-map-grid";

/** The two maps, side by side. */
const SIDES: { cells: MapSide; chart: string; title: string; side: string }[] = [
  {
    cells: "crankRpm",
    chart: "order-map-crank",
    title: "Order map — crank side",
    side: "Crank side",
  },
  {
    cells: "gearboxRpm",
    chart: "order-map-gearbox",
    title: "Order map — gearbox input",
    side: "Gearbox input",
  },
];

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
    return SIDES.map((s) =>
      byTime ? timeGrid(charts.orderMapByTime, s.cells) : rpmGrid(charts.orderMap, s.cells),
    );
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
        {SIDES.map((s, i) => (
          <HeatMap
            key={s.chart}
            chart={s.chart}
            title={s.title}
            side={s.side}
            grid={grids?.[i] ?? null}
            charts={charts}
            scale={scale}
            cursorRpm={byTime ? null : (cursorRpm ?? null)}
            fileSuffix={fileSuffix}
          />
        ))}
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

  const geometry = useMemo(() => mapGeometry(grid, width, step, count), [grid, width, step, count]);

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

  function cellUnder(clientX: number, clientY: number) {
    if (!grid || !geometry || !canvas.current) return null;
    const r = canvas.current.getBoundingClientRect();
    return cellAt(grid, geometry, clientX - r.left, clientY - r.top, step, count);
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

  const readout =
    (hover && grid && cellText(grid, side, hover.row, hover.k, step)) ||
    "Point at a cell, or focus the map and use the arrow keys, to read its amplitude.";
  const summary =
    status === "ready" && grid && charts ? mapSummary(title, grid, scale, step, count) : undefined;

  function csv() {
    if (!grid || !charts) return;
    const { header, rows } = mapTable(grid, step, count);
    downloadCsv(title, buildCsv(header, rows), fileSuffix);
  }

  const legendLine = `Colour: amplitude, ${scale.unit} (${scale.mode === "dB" ? "20·log10(A / 1 rpm)" : "linear"}); viridis colour ramp`;
  const hoverBox =
    hover && grid && geometry ? (
      <div
        aria-hidden="true"
        className="pointer-events-none absolute border-2 border-white outline outline-1 outline-neutral-900"
        style={cellBox(grid, geometry, hover.row, hover.k, step)}
      />
    ) : null;
  const cursorLine =
    cursorRpm !== null && geometry && cursorRpm >= geometry.x0 && cursorRpm <= geometry.x1 ? (
      <div
        aria-hidden="true"
        className="pointer-events-none absolute border-l border-dashed border-white"
        style={{ left: geometry.toX(cursorRpm), top: MARGIN.top, height: geometry.h }}
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
            onMouseMove={(e) => setHover(cellUnder(e.clientX, e.clientY))}
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
