import { signoffStateHints } from "~/lib/domain/signoff-text";
import type { SignoffView } from "~/lib/http/signoff-pages.server";
import { VerdictCaution } from "./caution-note";
import { linkClass } from "./form-fields";
import { Card, When } from "./page";
import { ClaimsSummary } from "./signoff-claims";
import { EvidenceTable, SignoffHistory } from "./signoff-evidence";
import { SignoffStateBadge } from "./signoff-state";

/**
 * A sign-off on its share link's page (issue 16): read only, the claims, the frozen evidence,
 * the history and the evidence report; no drive-log pages, raw files or other records.
 */
export function SharedSignoff({
  signoff: s,
  reportHref,
}: {
  signoff: SignoffView;
  reportHref: string;
}) {
  return (
    <section aria-labelledby="shared-signoff-title" className="space-y-6" data-shared-signoff>
      <div className="space-y-2">
        <h1
          id="shared-signoff-title"
          className="flex flex-wrap items-center gap-3 text-xl font-semibold"
        >
          Sign-off of damper variant {s.damperVariant} <SignoffStateBadge state={s.state} />
        </h1>
        <p className="text-sm text-neutral-600">{signoffStateHints[s.state]}</p>
        <p className="text-sm text-neutral-600">
          Proposed by {s.proposedBy.name} on <When date={s.proposedAt} />
          {s.decidedBy ? (
            <>
              ; {s.state === "rejected" ? "rejected" : "decided"} by {s.decidedBy.name} on{" "}
              <When date={s.decidedAt} />
            </>
          ) : null}
          .
        </p>
        {s.closedReason ? (
          <p className="rounded-md border border-amber-500 bg-amber-50 px-4 py-2 text-sm text-amber-950">
            {s.state === "superseded" ? "Superseded" : "Withdrawn"}: {s.closedReason}
          </p>
        ) : null}
        <p>
          <a href={reportHref} className={linkClass} download>
            Evidence report (PDF)
          </a>
        </p>
      </div>
      <Card title="Claims" id="claims">
        {s.note ? (
          <blockquote className="mb-3 border-l-4 border-indigo-300 px-3 py-1 text-sm whitespace-pre-line">
            {s.note}
          </blockquote>
        ) : null}
        <ClaimsSummary claims={s.claims} />
        <div className="mt-4">
          <VerdictCaution />
        </div>
      </Card>
      <Card title="Frozen evidence" id="evidence">
        <EvidenceTable signoff={s} />
      </Card>
      <Card title="History" id="history">
        <SignoffHistory history={s.history} />
      </Card>
    </section>
  );
}
