/**
 * A uPlot chart sized to its container: created in an effect (never on the server), resized
 * with a ResizeObserver, destroyed on cleanup. New `options` make a new chart; new `data` alone
 * is handed to setData.
 */
import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";

export type PlotOptions = Omit<uPlot.Options, "width" | "height">;

export function Plot({
  height,
  options,
  data,
  label,
  describedBy,
  keyboard = false,
  onPlot,
}: {
  height: number;
  options: PlotOptions;
  data: uPlot.AlignedData;
  /** The figure's accessible name (role="img"). */
  label: string;
  describedBy?: string;
  /**
   * When focused, Left/Right move the cursor one data point (an engine-speed bin, a trace sample,
   * an order), Page Up/Page Down a twentieth of the points (long traces), Home/End to the ends.
   */
  keyboard?: boolean;
  onPlot?: (plot: uPlot | null) => void;
}) {
  const host = useRef<HTMLDivElement>(null);
  const plot = useRef<uPlot | null>(null);
  const latest = useRef({ data, onPlot });
  latest.current = { data, onPlot };
  const drawn = useRef<uPlot.AlignedData | null>(null);

  useEffect(() => {
    const el = host.current;
    if (!el) return;
    const { data: initial, onPlot: report } = latest.current;
    const u = new uPlot({ ...options, width: Math.max(120, el.clientWidth), height }, initial, el);
    plot.current = u;
    drawn.current = initial;
    report?.(u);
    const observer = new ResizeObserver(() => {
      const width = el.clientWidth;
      if (width > 0 && Math.abs(width - u.width) >= 1) u.setSize({ width, height });
    });
    observer.observe(el);
    return () => {
      observer.disconnect();
      latest.current.onPlot?.(null);
      u.destroy();
      plot.current = null;
    };
  }, [options, height]);

  useEffect(() => {
    const u = plot.current;
    if (u && drawn.current !== data) {
      u.setData(data);
      drawn.current = data;
    }
  }, [data]);

  function onKeyDown(e: React.KeyboardEvent) {
    const u = plot.current;
    if (!keyboard || !u) return;
    const xs = u.data[0];
    const n = xs.length;
    if (!n) return;
    const now = u.cursor.idx ?? Math.floor(n / 2);
    const page = u.cursor.idx == null ? 0 : Math.max(1, Math.round(n / 20));
    const next =
      e.key === "PageDown"
        ? Math.min(n - 1, now + page)
        : e.key === "PageUp"
          ? Math.max(0, now - page)
          : e.key === "ArrowRight"
            ? Math.min(n - 1, now + (u.cursor.idx == null ? 0 : 1))
            : e.key === "ArrowLeft"
              ? Math.max(0, now - (u.cursor.idx == null ? 0 : 1))
              : e.key === "Home"
                ? 0
                : e.key === "End"
                  ? n - 1
                  : null;
    if (next === null) return;
    e.preventDefault();
    const left = u.valToPos(xs[next]!, "x");
    // The third argument (publish to the sync group) exists in uPlot 1.6 but not in its types.
    (u.setCursor as (o: { left: number; top: number }, fire: boolean, pub: boolean) => void)(
      { left, top: u.over.clientHeight / 2 },
      true,
      true,
    );
  }

  return (
    <div
      ref={host}
      role="img"
      aria-label={label}
      aria-describedby={describedBy}
      tabIndex={keyboard ? 0 : undefined}
      onKeyDown={keyboard ? onKeyDown : undefined}
      className="h-full w-full rounded-sm focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600"
    />
  );
}
