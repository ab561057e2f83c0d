/**
 * The frame every chart shares: title, controls, export buttons, the plot area of a fixed height
 * (a skeleton of the same size while loading, a message when there is nothing to draw), the
 * legend, the readout line and a visually hidden summary of the figures.
 */
import { useId, type ReactNode } from "react";
import { Legend, type LegendEntry } from "./legend";

export type FrameStatus = "loading" | "ready" | "empty";

export function ChartFrame({
  chart,
  title,
  exportName,
  height,
  status,
  emptyMessage,
  controls,
  note,
  legend = [],
  readout,
  summary,
  onCsv,
  onPng,
  attrs,
  children,
}: {
  /** The root's data-chart value (browser tests find charts by it). */
  chart: string;
  title: string;
  /** The name in the export buttons' labels, when the title changes (spectrum). */
  exportName?: string;
  height: number;
  status: FrameStatus;
  emptyMessage?: ReactNode;
  controls?: ReactNode;
  note?: ReactNode;
  legend?: LegendEntry[];
  readout?: ReactNode;
  summary?: string;
  onCsv?: () => void;
  onPng?: () => void;
  attrs?: Record<`data-${string}`, string | number | undefined>;
  /** The plot, given the id of the summary to point aria-describedby at. */
  children?: (summaryId: string) => ReactNode;
}) {
  const id = useId();
  const titleId = `${id}-title`;
  const summaryId = `${id}-summary`;
  const name = exportName ?? title;
  const ready = status === "ready";
  return (
    <figure
      data-chart={chart}
      data-status={status}
      aria-labelledby={titleId}
      aria-busy={status === "loading" || undefined}
      className="min-w-0 rounded-lg border border-neutral-200 bg-white p-4 shadow-xs"
      {...attrs}
    >
      <div className="flex min-h-8 flex-wrap items-center justify-between gap-x-4 gap-y-2">
        <h3 id={titleId} className="text-sm font-semibold text-neutral-900">
          {title}
        </h3>
        <div className="flex items-center gap-1.5">
          <ExportButton name={name} format="PNG" onClick={onPng} disabled={!ready || !onPng} />
          <ExportButton name={name} format="CSV" onClick={onCsv} disabled={!ready || !onCsv} />
        </div>
      </div>
      {controls ? (
        <div className="mt-2 flex min-h-8 flex-wrap items-center gap-x-4 gap-y-2">{controls}</div>
      ) : null}
      {note ? <p className="mt-2 text-xs text-neutral-600">{note}</p> : null}
      <div className={`relative mt-3 ${heightClass(height)}`}>
        {status === "loading" ? (
          <div
            className="h-full w-full animate-pulse rounded-md bg-neutral-100"
            aria-hidden="true"
          />
        ) : status === "empty" ? (
          <div className="flex h-full items-center justify-center rounded-md border border-dashed border-neutral-300 px-6 text-center text-sm text-neutral-600">
            <p>{emptyMessage}</p>
          </div>
        ) : (
          children?.(summaryId)
        )}
        {status === "loading" ? <span className="sr-only">Loading the {title}…</span> : null}
      </div>
      <div className="mt-3 min-h-5">
        {ready && legend.length ? <Legend entries={legend} /> : null}
      </div>
      <p className="mt-1 min-h-8 text-xs text-neutral-700 tabular-nums" aria-live="polite">
        {ready ? readout : null}
      </p>
      {ready && summary ? (
        <p id={summaryId} className="sr-only">
          {summary}
        </p>
      ) : null}
    </figure>
  );
}

/**
 * The plot area's height as a class, not a style attribute: the CSP refuses inline style
 * attributes in the server's HTML, and the skeleton must have its final height before hydration.
 */
const HEIGHTS: Record<number, string> = {
  260: "h-[260px]",
  300: "h-[300px]",
  340: "h-[340px]",
  200: "h-[200px]",
};
function heightClass(height: number): string {
  const cls = HEIGHTS[height];
  if (!cls) throw new Error(`Add the chart height ${height} px to HEIGHTS in chart-frame.tsx.`);
  return cls;
}

function ExportButton({
  name,
  format,
  onClick,
  disabled,
}: {
  name: string;
  format: "PNG" | "CSV";
  onClick?: () => void;
  disabled: boolean;
}) {
  return (
    <button
      type="button"
      aria-label={`Download ${name} as ${format}`}
      title={`Download ${name} as ${format}`}
      onClick={onClick}
      disabled={disabled}
      className="rounded-md border border-neutral-300 bg-white px-2 py-1 text-xs font-medium text-neutral-700 shadow-xs hover:bg-neutral-50 focus-visible:outline-2 focus-visible:outline-indigo-600 disabled:cursor-not-allowed disabled:opacity-50"
    >
      {format}
    </button>
  );
}

/** A segmented switch of real radio buttons (arrow keys move between them natively). */
export function Segmented<T extends string>({
  legend,
  value,
  options,
  onChange,
  disabled,
}: {
  legend: string;
  value: T;
  options: readonly { value: T; label: string }[];
  onChange: (value: T) => void;
  disabled?: boolean;
}) {
  const name = useId();
  return (
    <fieldset className="flex items-center gap-2" disabled={disabled}>
      <legend className="float-left mr-1 text-xs text-neutral-600">{legend}</legend>
      <div className="inline-flex rounded-md border border-neutral-300 bg-white p-0.5 shadow-xs">
        {options.map((o) => (
          <label
            key={o.value}
            className="cursor-pointer rounded px-2 py-0.5 text-xs text-neutral-700 has-checked:bg-neutral-800 has-checked:text-white has-focus-visible:outline-2 has-focus-visible:outline-indigo-600"
          >
            <input
              type="radio"
              name={name}
              value={o.value}
              checked={value === o.value}
              onChange={() => onChange(o.value)}
              className="sr-only"
            />
            {o.label}
          </label>
        ))}
      </div>
    </fieldset>
  );
}

export function SelectControl({
  label,
  value,
  options,
  onChange,
  disabled,
}: {
  label: string;
  value: string;
  options: readonly { value: string; label: string }[];
  onChange: (value: string) => void;
  disabled?: boolean;
}) {
  const id = useId();
  return (
    <div className="flex items-center gap-2">
      <label htmlFor={id} className="text-xs text-neutral-600">
        {label}
      </label>
      <select
        id={id}
        value={value}
        disabled={disabled}
        onChange={(e) => onChange(e.target.value)}
        className="rounded-md border border-neutral-300 bg-white py-0.5 pr-7 pl-2 text-xs shadow-xs focus-visible:outline-2 focus-visible:outline-indigo-600 disabled:opacity-50"
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </div>
  );
}

/** The whole set's error: what went wrong and what to do, with a retry. */
export function ChartsError({ error, onRetry }: { error: unknown; onRetry: () => void }) {
  const status = error instanceof ChartFetchError ? error.status : 0;
  const message = error instanceof Error ? error.message : String(error);
  const code = error instanceof ChartFetchError ? error.code : undefined;
  const advice =
    status === 404 && code === "no_result"
      ? "The charts appear when the analysis has finished. Reload the page then, or re-analyse the drive log if it failed."
      : status === 404
        ? "It may have been deleted or belong to another team: go back to the vehicle's drive logs."
        : status === 401 || status === 403
          ? "Sign in again, or ask an admin of the team for access."
          : "Check the connection and try again; if it keeps failing, reload the page.";
  return (
    <div
      role="alert"
      className="rounded-lg border border-red-200 bg-red-50 px-4 py-3 text-sm text-red-900"
    >
      <p className="font-medium">The charts could not be loaded: {message}</p>
      <p className="mt-1">{advice}</p>
      {status !== 404 && status !== 401 && status !== 403 ? (
        <button
          type="button"
          onClick={onRetry}
          className="mt-2 rounded-md border border-red-300 bg-white px-3 py-1 text-sm font-medium text-red-900 hover:bg-red-100"
        >
          Try again
        </button>
      ) : null}
    </div>
  );
}

export class ChartFetchError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly code?: string,
  ) {
    super(message);
  }
}
