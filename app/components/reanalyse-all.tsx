/**
 * The vehicle page's "re-analyse all" panel (issue 17; engineers and admins): new settings for
 * every drive log of the vehicle, or of one damper variant, queued at once; then the batch's
 * progress — counts, a bar and each drive log's state — polled with TanStack Query from
 * GET /api/v1/vehicles/:vehicleId/reanalyse/:batchId until every job has ended. The form posts
 * with a fetcher to /vehicles/:vehicleId/reanalyse (app/routes/vehicle.reanalyse.ts).
 */
import { useQuery } from "@tanstack/react-query";
import { useEffect, useRef, useState } from "react";
import { useFetcher, useRevalidator } from "react-router";
import type { BatchProgress } from "~/lib/data/reanalysis-batch.server";
import type { FetcherReply } from "./fetcher-form";
import { ErrorLine, SchemaForm, SubmitButton, useSchemaForm } from "./form";
import { ChoiceField } from "./form-fields";
import { EmptyState } from "./page";
import { fetchJson } from "./query-state";
import { reanalyseAllSchema, type QueuedBatchJson } from "./reanalyse-all-schema";
import { useHydrated } from "./use-hydrated";
import { ReanalyseFields } from "./reanalyse-form";

/** How often the panel asks while the batch runs, ms (jobs write progress every 500 ms). */
const POLL_MS = 1000;

type Reply = FetcherReply & { batch?: QueuedBatchJson };

const stateWords: Record<BatchProgress["logs"][number]["state"], string> = {
  queued: "waiting",
  running: "analysing",
  done: "done",
  failed: "failed",
};

export function ReanalyseAllPanel({
  vehicleId,
  logs,
  firingOrder,
}: {
  vehicleId: number;
  logs: { damperVariant: string | null; status: string }[];
  firingOrder: number;
}) {
  const fetcher = useFetcher<Reply>();
  const reply = fetcher.state === "idle" ? fetcher.data : undefined;
  const [form, fields] = useSchemaForm("reanalyse-all", reanalyseAllSchema, reply?.result);
  const [batchId, setBatchId] = useState<string | null>(null);
  useEffect(() => {
    if (reply?.batch) setBatchId(reply.batch.batchId);
  }, [reply]);
  const variants = [...new Set(logs.map((l) => l.damperVariant).filter((v) => v))] as string[];
  const busy = logs.some((l) => l.status === "queued" || l.status === "analysing");
  const hydrated = useHydrated();

  return (
    <section
      aria-labelledby="reanalyse-all-title"
      id="reanalyse-all-panel"
      className="rounded-lg border border-neutral-200 bg-white p-4 shadow-xs sm:p-6"
    >
      <h2 id="reanalyse-all-title" className="text-base font-semibold">
        Re-analyse all drive logs
      </h2>
      <p className="mt-1 max-w-3xl text-sm text-neutral-600">
        Every drive log of this vehicle (or of one damper variant) gets a new analysis version with
        these settings; the earlier versions are kept, and sign-offs that rest on a re-analysed
        drive log are marked superseded.
      </p>
      <noscript>
        <p className="mt-2 text-sm text-amber-800">
          This panel needs JavaScript; scripts can use POST /api/v1/vehicles/:vehicleId/reanalyse.
        </p>
      </noscript>
      <div className="mt-4 space-y-4">
        {logs.length === 0 ? (
          <EmptyState>
            No drive logs yet: upload some first, then re-analyse them here with other settings.
          </EmptyState>
        ) : (
          <SchemaForm
            fetcher={fetcher}
            action={`/vehicles/${vehicleId}/reanalyse`}
            form={form}
            intent="reanalyse-all"
            className="space-y-4"
          >
            <ReanalyseFields fields={fields} current={{ firingOrder }} />
            {variants.length > 0 ? (
              <ChoiceField
                label="Drive logs"
                meta={fields.damperVariant}
                options={[
                  { value: "", label: `All ${logs.length} drive logs` },
                  ...variants.map((v) => ({ value: v, label: `Damper variant ${v} only` })),
                ]}
              />
            ) : null}
            {busy ? (
              <p className="text-sm text-neutral-600">
                Some drive logs are still being analysed; wait until they are done.
              </p>
            ) : null}
            {/* The panel needs its script (a click before hydration would go nowhere). */}
            <SubmitButton tone="secondary" disabled={!hydrated}>
              {fetcher.state === "submitting" ? "Queueing…" : "Re-analyse all"}
            </SubmitButton>
          </SchemaForm>
        )}
        {reply?.error ? <ErrorLine message={reply.error.message} /> : null}
        {batchId ? <BatchProgressView vehicleId={vehicleId} batchId={batchId} /> : null}
      </div>
    </section>
  );
}

function BatchProgressView({ vehicleId, batchId }: { vehicleId: number; batchId: string }) {
  const revalidator = useRevalidator();
  const url = `/api/v1/vehicles/${vehicleId}/reanalyse/${batchId}`;
  const query = useQuery({
    queryKey: ["reanalyse-batch", vehicleId, batchId],
    queryFn: () =>
      fetchJson<BatchProgress>(url, "The re-analysis progress", (b) => Array.isArray(b.logs)),
    staleTime: 0,
    refetchOnWindowFocus: false,
    refetchInterval: (q) => (q.state.data?.finished ? false : POLL_MS),
  });
  // Once every job has ended, the page loads again (new figures in the table and cards).
  const finished = query.data?.finished ?? false;
  const reloaded = useRef(false);
  useEffect(() => {
    if (!finished || reloaded.current) return;
    reloaded.current = true;
    void revalidator.revalidate();
  }, [finished, revalidator]);

  if (query.isError)
    return (
      <p role="alert" className="text-sm text-red-700">
        {query.error.message} The re-analysis goes on regardless; reload the page to see the drive
        logs' states.{" "}
        <button type="button" className="underline" onClick={() => void query.refetch()}>
          Try again
        </button>
      </p>
    );
  const p = query.data;
  const summary = p
    ? p.finished
      ? `Re-analysis finished: ${p.done} of ${p.total} done${p.failed ? `, ${p.failed} failed (see each drive log)` : ""}.`
      : `Re-analysing: ${p.done} of ${p.total} done, ${p.running} analysing, ${p.queued} waiting${p.failed ? `, ${p.failed} failed` : ""}.`
    : "Re-analysis queued.";
  return (
    <div className="space-y-2" data-reanalyse-batch={batchId}>
      <p role="status" aria-live="polite" className="text-sm font-medium text-neutral-900">
        {summary}
      </p>
      {p ? (
        <>
          <progress
            className="h-2 w-full accent-indigo-600"
            max={p.total}
            value={p.done + p.failed}
            aria-label="Drive logs re-analysed"
          />
          <details className="text-sm">
            <summary className="cursor-pointer text-neutral-700">Each drive log</summary>
            <ul className="mt-2 space-y-1">
              {p.logs.map((l) => (
                <li key={l.driveLogId} className="flex flex-wrap gap-x-2">
                  <a className="underline" href={`/vehicles/${vehicleId}/logs/${l.driveLogId}`}>
                    {l.fileName}
                  </a>
                  <span className={l.state === "failed" ? "text-red-700" : "text-neutral-600"}>
                    {stateWords[l.state]}
                    {l.state === "running" ? ` ${Math.round(l.progress * 100)} %` : ""}
                    {l.analysisVersion ? ` (version ${l.analysisVersion})` : ""}
                    {l.error ? `: ${l.error}` : ""}
                  </span>
                </li>
              ))}
            </ul>
          </details>
        </>
      ) : null}
    </div>
  );
}
