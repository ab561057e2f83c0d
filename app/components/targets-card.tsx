import type { SubmissionResult } from "@conform-to/react";
import { Link } from "react-router";
import type { Target, TargetVerdict } from "~/lib/domain/targets";
import { limitText, marginText, scopeText, TARGET_STATUS_LABELS } from "~/lib/domain/target-text";
import { countText } from "~/lib/base/plural";
import { DeleteTarget } from "./delete-target";
import { Card, EmptyState } from "./page";
import { ReplyDisclosure } from "./reply-disclosure";
import { TargetForm } from "./target-form";

const kindLabels: Record<Target["kind"], string> = {
  isolation: "Isolation ",
  rattle: "Rattle: ",
  "start-stop": "Start/stop: ",
  "twist-margin": "Twist margin: ",
};

/** A target with how the vehicle's analysed drive logs fare against it. */
export interface TargetSummary extends Target {
  /** Over the analysed drive logs the target applies to. */
  counts: { passed: number; failed: number; notCovered: number; applicable: number };
  /** The verdict of the newest analysed drive log it applies to. */
  latest: { logId: number; fileName: string; verdict: TargetVerdict } | null;
}

/** What the vehicle page's action answers for a target form: which form, and conform's reply. */
export interface TargetFormReply {
  form: string;
  result: SubmissionResult<string[]>;
}

/** The vehicle page's "Targets" card (docs/ui.md, vehicle page item 2). */
export function TargetsCard({
  vehicleId,
  targets,
  canEdit,
  reply,
  confirmDelete = null,
  analysedLogs,
  rattleLimitRadS2,
  damperTravelLimitDeg,
}: {
  vehicleId: number;
  targets: TargetSummary[];
  canEdit: boolean;
  reply: TargetFormReply | null;
  /** The target whose delete button was pressed without JavaScript: the page asks first. */
  confirmDelete?: number | null;
  /** Drive logs of the vehicle with a finished analysis. */
  analysedLogs: number;
  rattleLimitRadS2: number;
  /** The vehicle's damper travel limit (for the twist-margin form's hint); optional. */
  damperTravelLimitDeg?: number | null;
}) {
  return (
    <Card title="Targets" id="targets">
      <div className="space-y-4">
        {targets.length === 0 ? (
          <EmptyState>
            No targets yet.{" "}
            {canEdit
              ? "Add one below: a minimum isolation over an engine-speed range, a maximum angular acceleration at idle, a maximum amplification at engine start and stop, or a minimum twist margin to the damper's end stops."
              : "An engineer sets the programme's targets for this vehicle."}
          </EmptyState>
        ) : (
          <ul className="divide-y divide-neutral-100 rounded-md border border-neutral-200">
            {targets.map((t) => (
              <li key={t.id} className="px-4 py-3" data-target-id={t.id}>
                <div className="flex flex-wrap items-baseline justify-between gap-x-6 gap-y-1">
                  <div>
                    <p className="font-medium text-neutral-900">{t.name}</p>
                    <p className="text-sm text-neutral-700">
                      {kindLabels[t.kind]}
                      {limitText(t)}
                    </p>
                    <p className="text-xs text-neutral-500">{scopeText(t)}</p>
                  </div>
                  <Counts counts={t.counts} analysedLogs={analysedLogs} />
                </div>
                {t.latest ? <Latest vehicleId={vehicleId} latest={t.latest} /> : null}
                {canEdit ? (
                  <ReplyDisclosure
                    className="mt-2"
                    reply={reply?.form === `target-${t.id}` ? reply.result : null}
                    forceOpen={confirmDelete === t.id}
                    summary={
                      <span className="text-sm text-indigo-700 hover:text-indigo-900">
                        Edit or delete <span className="sr-only">{t.name}</span>
                      </span>
                    }
                  >
                    <div className="mt-3 space-y-3">
                      <TargetForm
                        id={`target-${t.id}`}
                        target={t}
                        reply={reply?.form === `target-${t.id}` ? reply.result : null}
                        rattleLimitRadS2={rattleLimitRadS2}
                        damperTravelLimitDeg={damperTravelLimitDeg}
                      />
                      <DeleteTarget
                        vehicleId={vehicleId}
                        target={t}
                        asked={confirmDelete === t.id}
                      />
                    </div>
                  </ReplyDisclosure>
                ) : null}
              </li>
            ))}
          </ul>
        )}
        {canEdit ? (
          <ReplyDisclosure
            reply={reply?.form === "target-new" ? reply.result : null}
            summary={
              <span className="text-sm font-medium text-indigo-700 hover:text-indigo-900">
                Add a target
              </span>
            }
          >
            <div className="mt-3">
              <TargetForm
                id="target-new"
                reply={reply?.form === "target-new" ? reply.result : null}
                rattleLimitRadS2={rattleLimitRadS2}
                damperTravelLimitDeg={damperTravelLimitDeg}
              />
            </div>
          </ReplyDisclosure>
        ) : null}
      </div>
    </Card>
  );
}

/** The newest applicable drive log's verdict, with its margin and the reason in words. */
function Latest({
  vehicleId,
  latest: { logId, fileName, verdict: v },
}: {
  vehicleId: number;
  latest: NonNullable<TargetSummary["latest"]>;
}) {
  const tone =
    v.status === "pass"
      ? "text-green-700"
      : v.status === "fail"
        ? "text-red-700"
        : "text-neutral-700";
  return (
    <p className="mt-1 text-sm text-neutral-700" data-latest-verdict={v.status}>
      Latest:{" "}
      <Link
        to={`/vehicles/${vehicleId}/logs/${logId}`}
        className="text-indigo-700 underline underline-offset-2 hover:text-indigo-900"
      >
        {fileName}
      </Link>{" "}
      <span className={`font-medium ${tone}`}>{TARGET_STATUS_LABELS[v.status]}</span>
      {v.margin !== null ? <span className="tabular-nums"> (margin {marginText(v)})</span> : null}
      <span className="block text-xs text-neutral-500">{v.detail}</span>
    </p>
  );
}

function Counts({
  counts: c,
  analysedLogs,
}: {
  counts: TargetSummary["counts"];
  analysedLogs: number;
}) {
  if (c.applicable === 0)
    return (
      <p className="text-sm text-neutral-500">
        {analysedLogs === 0
          ? "No analysed drive logs yet"
          : "Applies to none of the analysed drive logs"}
      </p>
    );
  const pill = "inline-flex items-center rounded px-1.5 py-0.5 text-xs font-medium";
  return (
    <p className="flex flex-wrap items-center gap-1.5 text-sm text-neutral-600">
      <span className={`${pill} bg-green-50 text-green-800`}>{c.passed} passing</span>
      <span
        className={`${pill} ${c.failed ? "bg-red-50 text-red-800" : "bg-neutral-100 text-neutral-600"}`}
      >
        {c.failed} failing
      </span>
      {c.notCovered ? (
        <span className={`${pill} bg-neutral-100 text-neutral-700`}>
          {c.notCovered} not covered
        </span>
      ) : null}
      <span>of {countText(c.applicable, "analysed drive log")} it applies to</span>
    </p>
  );
}
