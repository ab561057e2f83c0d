import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useId } from "react";
import type { ShareSummary } from "~/lib/domain/share-schema";
import { EmptyState } from "./page";
import { fetchJson, QueryState } from "./query-state";
import { CreateForm, EmailForm } from "./share-forms";
import { ShareTable } from "./share-table";

/**
 * The share panel of a drive log (and of a comparison): make a share link (shown once, with a
 * copy button), send it by e-mail, and the links made so far with their views, expiry, extend
 * and revoke. Engineers and admins only; the server checks it again on every request.
 *
 * `endpoint` is the subject's resource route (app/routes/drive-log.share.ts, comparison.share.ts):
 * GET lists its links (TanStack Query), POST takes intent create / extend / revoke / email
 * (useFetcher). For a comparison, `logs` is sent along in the query and the forms.
 */
export function SharePanel({
  endpoint,
  logs,
  signoff = false,
}: {
  endpoint: string;
  logs?: number[];
  /** A sign-off's panel: the link shows the evidence and the report, never a raw file. */
  signoff?: boolean;
}) {
  const headingId = useId();
  const listUrl = logs ? `${endpoint}?logs=${logs.join(",")}` : endpoint;
  const queryKey = ["share-links", listUrl];
  const queryClient = useQueryClient();
  const query = useQuery({
    queryKey,
    queryFn: async () =>
      (
        await fetchJson<{ shares?: ShareSummary[] }>(
          listUrl,
          "The share links",
          (body) => !!body.shares,
        )
      ).shares!,
    staleTime: 0,
  });
  const refresh = () => void queryClient.invalidateQueries({ queryKey });
  const hidden = logs ? <input type="hidden" name="logs" value={logs.join(",")} /> : null;

  return (
    <section
      aria-labelledby={headingId}
      className="rounded-lg border border-neutral-200 bg-white p-6 shadow-xs"
      id="share"
      data-share-panel
    >
      <h2 id={headingId} className="text-base font-semibold">
        Share link
      </h2>
      <p className="mt-1 max-w-3xl text-sm text-neutral-600">
        {signoff
          ? "A read-only page of this sign-off for colleagues without an account: its claims, the frozen evidence and the evidence report (PDF); no raw files and no other records of the team. It stops working when it expires or you revoke it."
          : "A read-only page of these results for colleagues without an account: the summary and the charts, no other records of the team. It stops working when it expires or you revoke it."}
      </p>
      <noscript>
        <p className="mt-2 text-sm text-amber-800">
          Making share links here needs JavaScript; scripts can use POST /api/v1/logs/:logId/shares.
        </p>
      </noscript>
      <div className="mt-4 space-y-3">
        <Disclosure summary="Make a share link">
          <CreateForm endpoint={endpoint} hidden={hidden} onDone={refresh} noRaw={signoff} />
        </Disclosure>
        <Disclosure summary="Send by e-mail">
          <EmailForm endpoint={endpoint} hidden={hidden} onDone={refresh} noRaw={signoff} />
        </Disclosure>
      </div>
      <h3 className="mt-6 text-sm font-semibold text-neutral-700">Links made so far</h3>
      <div className="mt-2" aria-live="polite" aria-busy={query.isPending}>
        <QueryState
          query={query}
          loadingLabel="Loading the share links"
          height="h-16"
          onRetry={refresh}
        >
          {(shares) =>
            shares.length === 0 ? (
              <EmptyState>
                No share links yet. Make one above; it is shown once, so copy it then.
              </EmptyState>
            ) : (
              <ShareTable shares={shares} endpoint={endpoint} hidden={hidden} onDone={refresh} />
            )
          }
        </QueryState>
      </div>
    </section>
  );
}

function Disclosure({ summary, children }: { summary: string; children: React.ReactNode }) {
  return (
    <details className="group rounded-md border border-neutral-200">
      <summary className="cursor-pointer rounded-md px-4 py-2 text-sm font-medium text-indigo-800 select-none hover:bg-neutral-50 focus-visible:outline-2 focus-visible:outline-indigo-600">
        {summary}
      </summary>
      <div className="border-t border-neutral-200 p-4">{children}</div>
    </details>
  );
}
