import type { AnalysisSummary } from "~/lib/domain/analysis-summary";
import type { TargetVerdict } from "~/lib/domain/targets";
import { AnalysisSummaryView } from "./analysis-summary";
import { EarlierVersionNote, type VersionRow } from "./analysis-versions";
import { When } from "./page";

/**
 * The drive-log page's "Analysis" section: which version is shown (and a note when it is an
 * earlier one, or when a newer analysis is running), then the verdict strip.
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
    </section>
  );
}
