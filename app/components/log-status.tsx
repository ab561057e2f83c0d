import type { LogState } from "~/lib/domain/drive-log-terms";

/** A drive log's state as the pages poll it (GET /vehicles/:id/status or /api/v1/logs/:id). */
export interface LogProgress {
  id: number;
  status: LogState;
  /** Overall analysis progress, 0–1. */
  progress: number;
  stage: string | null;
}

const stageLabels: Record<string, string> = {
  parse: "reading the file",
  track: "order tracking",
  spectra: "spectra",
  results: "results",
};

export function isActive(status: LogState): boolean {
  return status === "queued" || status === "analysing";
}

const badge = "inline-flex items-center rounded px-1.5 py-0.5 text-xs font-medium";

/** Status with, while it runs, a labelled progress bar (stage and percent). */
export function LogStatus({ log, label }: { log: LogProgress; label: string }) {
  if (log.status === "done")
    return (
      <span data-log-status="done" className={`${badge} bg-green-50 text-green-800`}>
        Done
      </span>
    );
  if (log.status === "failed")
    return (
      <span data-log-status="failed" className={`${badge} bg-red-50 text-red-800`}>
        Failed
      </span>
    );
  if (log.status === "queued")
    return (
      <span data-log-status="queued" className={`${badge} bg-neutral-100 text-neutral-700`}>
        Queued
      </span>
    );
  const percent = Math.round(log.progress * 100);
  const stage = log.stage ? (stageLabels[log.stage] ?? log.stage) : "starting";
  return (
    <div data-log-status="analysing" className="min-w-36">
      <div className="flex justify-between gap-2 text-xs text-neutral-700">
        <span>Analysing: {stage}</span>
        <span>{percent} %</span>
      </div>
      <progress
        className="mt-1 h-1.5 w-full accent-indigo-600"
        max={100}
        value={percent}
        aria-label={`Analysis of ${label}`}
        aria-valuetext={`${percent} percent, ${stage}`}
      />
    </div>
  );
}
