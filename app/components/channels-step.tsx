/**
 * The drive-log page's channels: the channel chooser when it is offered, else which columns the
 * last analysis read. Offered at once (open) when the analysis failed for a column reason, and
 * — folded — when the file holds more candidates than the three roles need, so a technician can
 * pick others. CSV and MDF4 files are chosen the same way.
 */
import type { SubmissionResult } from "@conform-to/react";
import type { AppliedMapping } from "~/lib/domain/drive-log-terms";
import { ChannelChooser, ChannelChooserState, useChannels } from "./channel-chooser";
import { columnsUsedText } from "./column-mapping";
import { ErrorLine } from "./form";
import { Card } from "./page";
import { moreCandidatesThanRoles } from "~/lib/domain/channel-candidates";

export function ChannelsStep({
  vehicleId,
  logId,
  offer,
  failedOverColumns,
  settled,
  applied,
  lastResult,
}: {
  vehicleId: number;
  logId: number;
  /** The user may choose (technician and up, on the latest version). */
  offer: boolean;
  /** The analysis failed over its columns: the chooser is open. */
  failedOverColumns: boolean;
  /** The analysis is done or failed (not queued or running). */
  settled: boolean;
  applied: AppliedMapping | null;
  lastResult: SubmissionResult<string[]> | null | undefined;
}) {
  const query = useChannels(logId, offer && settled);
  const used = applied ? (
    <p className="text-sm text-neutral-600" data-columns-used={applied.source}>
      {columnsUsedText(applied)}
    </p>
  ) : null;
  const many = !!query.data && moreCandidatesThanRoles(query.data);
  if (!offer || !settled || (!failedOverColumns && !many)) return used;
  // Rendered here, not in the chooser, so the refusal shows before the channel list arrives.
  const refusal = Object.values(lastResult?.error ?? {}).flatMap((v) => v ?? []);
  const chooser = (
    <>
      {refusal.length ? <ErrorLine message={refusal.join(" ")} /> : null}
      <ChannelChooserState query={query}>
        {(channels) => (
          <ChannelChooser
            vehicleId={vehicleId}
            logId={logId}
            channels={channels}
            applied={applied}
          />
        )}
      </ChannelChooserState>
    </>
  );
  return (
    <Card title="Channel chooser" id="mapping">
      <div className="space-y-4">
        {used}
        {failedOverColumns || lastResult?.status === "error" ? (
          chooser
        ) : (
          <details>
            <summary className="cursor-pointer text-sm font-medium text-indigo-800">
              This file holds {query.data?.length} channels: pick others for the analysis
            </summary>
            <div className="mt-3">{chooser}</div>
          </details>
        )}
      </div>
    </Card>
  );
}
