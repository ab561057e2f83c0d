import type { AnalysisSummary } from "~/lib/domain/analysis-summary";
import type { TargetVerdict } from "~/lib/domain/targets";
import type { TransientEvent } from "~/lib/signal/result-schema";
import { AnalysisSummaryView } from "./analysis-summary";
import { EarlierVersionNote, type VersionRow } from "./analysis-versions";
import { When } from "./page";
import { StartStopTable } from "./start-stop-table";

/**
 * The drive-log page's "Analysis" section: which version is shown (and a note when it is an
 * earlier one, or when a newer analysis is running), then the verdict strip and, when the drive
 * log holds engine starts or stops (or is a start-stop test), the "Starts and stops" panel.
 */
export function AnalysisSection({
  summary,
  verdicts,
  shown,
  earlier,
  latest,
  logHref,
  rattleHref,
  running,
  startStop,
}: {
  summary: AnalysisSummary;
  verdicts: TargetVerdict[] | null;
  shown: VersionRow | undefined;
  /** The version shown when it is not the latest (read only). */
  earlier: VersionRow | null;
  latest: VersionRow | undefined;
  logHref: string;
  rattleHref: string;
  /** A new analysis of the drive log is queued or running. */
  running: boolean;
  /** Events of the version shown; null before events were found. */
  startStop?: {
    events: TransientEvent[] | null;
    show: boolean;
    travelLimitDeg: number | null;
    editHref?: string;
  };
}) {
  return (
    <section aria-labelledby="analysis-title" className="space-y-4">
      <h2 id="analysis-title" className="text-lg font-semibold">
        Analysis{shown ? ` version ${shown.version}` : ""}
        {shown ? (
          <span className="ml-2 text-sm font-normal text-neutral-500">
            made <When date={shown.createdAt} />
          </span>
        ) : null}
      </h2>
      {earlier && latest ? (
        <EarlierVersionNote shown={earlier} latest={latest} logHref={logHref} />
      ) : null}
      {running && !earlier ? (
        <p className="text-sm text-neutral-600">
          A new analysis is running; these are the figures of the previous version.
        </p>
      ) : null}
      <AnalysisSummaryView
        s={summary}
        targets={verdicts}
        rattleHref={summary.rattle && !earlier ? rattleHref : undefined}
      />
      {startStop?.show ? (
        <StartStopTable
          events={startStop.events}
          travelLimitDeg={startStop.travelLimitDeg}
          editHref={startStop.editHref}
        />
      ) : null}
    </section>
  );
}
