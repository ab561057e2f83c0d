import type { SubmissionResult } from "@conform-to/react";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useEffect, useId, useRef, useState } from "react";
import { useFetcher } from "react-router";
import {
  createShareSchema,
  emailShareSchema,
  SHARE_DEFAULT_DAYS,
  SHARE_MAX_DAYS,
  SHARE_MAX_RECIPIENTS,
  shareStateLabels,
  type ShareSummary,
} from "~/lib/domain/share-schema";
import { CsrfInput } from "./csrf-input";
import { FormError, SubmitButton, useSchemaForm } from "./form";
import { inputClass, InputField, TextAreaField } from "./form-fields";
import { EmptyState, tableClass, tdClass, thClass, When } from "./page";
import { ScrollArea } from "./scroll-area";

/**
 * The share panel of a drive log (and of a comparison): make a share link (shown once, with a
 * copy button), send it by e-mail, and the links made so far with their views, expiry, extend
 * and revoke. Engineers and admins only; the server checks it again on every request.
 *
 * `endpoint` is the subject's resource route (app/routes/drive-log.share.ts, comparison.share.ts):
 * GET lists its links (TanStack Query), POST takes intent create / extend / revoke / email
 * (useFetcher). For a comparison, `logs` is sent along in the query and the forms.
 */
export function SharePanel({ endpoint, logs }: { endpoint: string; logs?: number[] }) {
  const headingId = useId();
  const listUrl = logs ? `${endpoint}?logs=${logs.join(",")}` : endpoint;
  const queryKey = ["share-links", listUrl];
  const queryClient = useQueryClient();
  const query = useQuery({
    queryKey,
    queryFn: async (): Promise<ShareSummary[]> => {
      const response = await fetch(listUrl, { headers: { Accept: "application/json" } });
      const body = (await response.json().catch(() => null)) as {
        shares?: ShareSummary[];
        error?: { message: string };
      } | null;
      if (!response.ok || !body?.shares)
        throw new Error(
          body?.error?.message ?? `The share links could not be loaded (${response.status}).`,
        );
      return body.shares;
    },
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
        A read-only page of these results for colleagues without an account: the summary and the
        charts, no other records of the team. It stops working when it expires or you revoke it.
      </p>
      <noscript>
        <p className="mt-2 text-sm text-amber-800">
          Making share links here needs JavaScript; scripts can use POST /api/v1/logs/:logId/shares.
        </p>
      </noscript>
      <div className="mt-4 space-y-3">
        <Disclosure summary="Make a share link">
          <CreateForm endpoint={endpoint} hidden={hidden} onDone={refresh} />
        </Disclosure>
        <Disclosure summary="Send by e-mail">
          <EmailForm endpoint={endpoint} hidden={hidden} onDone={refresh} />
        </Disclosure>
      </div>
      <h3 className="mt-6 text-sm font-semibold text-neutral-700">Links made so far</h3>
      <div className="mt-2" aria-live="polite" aria-busy={query.isPending}>
        {query.isPending ? (
          <div
            className="h-16 animate-pulse rounded-md bg-neutral-100"
            aria-label="Loading the share links"
          />
        ) : query.isError ? (
          <p role="alert" className="text-sm text-red-700">
            {query.error.message}{" "}
            <button type="button" className="underline" onClick={refresh}>
              Try again
            </button>
          </p>
        ) : query.data.length === 0 ? (
          <EmptyState>
            No share links yet. Make one above; it is shown once, so copy it then.
          </EmptyState>
        ) : (
          <ShareTable shares={query.data} endpoint={endpoint} hidden={hidden} onDone={refresh} />
        )}
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

type Reply = {
  intent?: string;
  result?: SubmissionResult<string[]>;
  created?: { id: number; url: string; expiresAt: string };
  notice?: string;
  error?: { code: string; message: string };
};

/** Calls `onDone` once per successful reply of a fetcher. */
function useOnReply(fetcher: { state: string; data?: Reply }, onDone: () => void) {
  const seen = useRef<Reply | undefined>(undefined);
  useEffect(() => {
    if (fetcher.state !== "idle" || !fetcher.data || fetcher.data === seen.current) return;
    seen.current = fetcher.data;
    if (!fetcher.data.error && fetcher.data.result?.status !== "error") onDone();
  });
}

function DaysField({ meta }: { meta: Parameters<typeof InputField>[0]["meta"] }) {
  return (
    <InputField
      label="Works for"
      unit="days"
      meta={meta}
      numeric
      hint={`1 to ${SHARE_MAX_DAYS} days; ${SHARE_DEFAULT_DAYS} unless you change it.`}
    />
  );
}

function RawCheckbox({ id }: { id: string }) {
  return (
    <div className="flex items-start gap-2">
      <input
        id={id}
        name="allowRawDownload"
        type="checkbox"
        className="mt-1 size-4 accent-indigo-600"
      />
      <label htmlFor={id} className="text-sm text-neutral-800">
        Allow downloading the raw file
        <span className="block text-xs text-neutral-500">
          Off: the recipient sees the results only, not the recorded data.
        </span>
      </label>
    </div>
  );
}

function CreateForm({
  endpoint,
  hidden,
  onDone,
}: {
  endpoint: string;
  hidden: React.ReactNode;
  onDone: () => void;
}) {
  const fetcher = useFetcher<Reply>();
  const reply = fetcher.data;
  const [form, fields] = useSchemaForm("share-create", createShareSchema, reply?.result, {
    expiresInDays: String(SHARE_DEFAULT_DAYS),
  });
  useOnReply(fetcher, onDone);
  const created = fetcher.state === "idle" ? reply?.created : undefined;
  return (
    <div className="space-y-4">
      <fetcher.Form
        method="post"
        action={endpoint}
        id={form.id}
        onSubmit={form.onSubmit}
        noValidate
        className="space-y-4"
      >
        <CsrfInput />
        {hidden}
        <input type="hidden" name="intent" value="create" />
        <FormError id={form.errorId} errors={form.errors} />
        <div className="grid gap-4 sm:grid-cols-[12rem_1fr]">
          <DaysField meta={fields.expiresInDays} />
          <TextAreaField
            label="Note"
            meta={fields.note}
            rows={2}
            hint="Optional; shown on the shared page, e.g. what to look at."
          />
        </div>
        <RawCheckbox id="share-create-raw" />
        <SubmitButton>
          {fetcher.state === "submitting" ? "Making the link…" : "Make share link"}
        </SubmitButton>
      </fetcher.Form>
      {reply?.error ? <ErrorLine message={reply.error.message} /> : null}
      {created ? <CreatedLink key={created.id} created={created} /> : null}
    </div>
  );
}

function CreatedLink({ created }: { created: { url: string; expiresAt: string } }) {
  const input = useRef<HTMLInputElement>(null);
  const [copied, setCopied] = useState("");
  useEffect(() => {
    input.current?.focus();
    input.current?.select();
  }, []);
  async function copy() {
    try {
      await navigator.clipboard.writeText(created.url);
      setCopied("Copied to the clipboard.");
    } catch {
      input.current?.select();
      setCopied("Copying was refused by the browser: the link is selected, press Ctrl+C.");
    }
  }
  return (
    <div className="rounded-md border border-indigo-200 bg-indigo-50 p-4" data-created-share>
      <label htmlFor="share-created-url" className="block text-sm font-semibold text-indigo-950">
        Copy the share link now: it is shown only this once
      </label>
      <div className="mt-2 flex flex-wrap gap-2">
        <input
          ref={input}
          id="share-created-url"
          readOnly
          value={created.url}
          className={`${inputClass} min-w-0 flex-1 font-mono`}
          aria-describedby="share-created-expiry"
        />
        <button
          type="button"
          onClick={() => void copy()}
          className="rounded-md bg-indigo-600 px-4 py-2 text-sm font-medium text-white hover:bg-indigo-700 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600"
        >
          Copy link
        </button>
      </div>
      <p id="share-created-expiry" className="mt-2 text-sm text-indigo-900">
        Works until <When date={created.expiresAt} />. Twistlog keeps only a fingerprint of it.
      </p>
      <p role="status" className="mt-1 text-sm text-indigo-900">
        {copied}
      </p>
    </div>
  );
}

function EmailForm({
  endpoint,
  hidden,
  onDone,
}: {
  endpoint: string;
  hidden: React.ReactNode;
  onDone: () => void;
}) {
  const fetcher = useFetcher<Reply>();
  const reply = fetcher.data;
  const [form, fields] = useSchemaForm("share-email", emailShareSchema, reply?.result, {
    expiresInDays: String(SHARE_DEFAULT_DAYS),
  });
  useOnReply(fetcher, onDone);
  return (
    <fetcher.Form
      method="post"
      action={endpoint}
      id={form.id}
      onSubmit={form.onSubmit}
      noValidate
      className="space-y-4"
    >
      <CsrfInput />
      {hidden}
      <input type="hidden" name="intent" value="email" />
      <FormError id={form.errorId} errors={form.errors} />
      <TextAreaField
        label="E-mail addresses"
        meta={fields.recipients}
        rows={2}
        hint={`Separated by commas or new lines, up to ${SHARE_MAX_RECIPIENTS}. Members of your team get the normal link to this page; everyone else gets a share link.`}
      />
      <TextAreaField
        label="Message"
        meta={fields.message}
        rows={3}
        hint="Optional; goes into the e-mail and onto the shared page."
      />
      <div className="max-w-xs">
        <DaysField meta={fields.expiresInDays} />
      </div>
      <RawCheckbox id="share-email-raw" />
      <SubmitButton>{fetcher.state === "submitting" ? "Sending…" : "Send"}</SubmitButton>
      {reply?.error ? <ErrorLine message={reply.error.message} /> : null}
      {fetcher.state === "idle" && reply?.notice ? (
        <p role="status" className="text-sm text-green-800">
          {reply.notice}
        </p>
      ) : null}
    </fetcher.Form>
  );
}

function ErrorLine({ message }: { message: string }) {
  return (
    <p
      role="alert"
      className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800"
    >
      {message}
    </p>
  );
}

function ShareTable({
  shares,
  endpoint,
  hidden,
  onDone,
}: {
  shares: ShareSummary[];
  endpoint: string;
  hidden: React.ReactNode;
  onDone: () => void;
}) {
  return (
    <ScrollArea label="Share links">
      <table className={tableClass}>
        <caption className="sr-only">Share links of these results</caption>
        <thead>
          <tr>
            <th scope="col" className={thClass}>
              Made
            </th>
            <th scope="col" className={thClass}>
              Note
            </th>
            <th scope="col" className={thClass}>
              State
            </th>
            <th scope="col" className={thClass}>
              Expires
            </th>
            <th scope="col" className={thClass}>
              Views
            </th>
            <th scope="col" className={thClass}>
              Raw file
            </th>
            <th scope="col" className={thClass}>
              Manage
            </th>
          </tr>
        </thead>
        <tbody>
          {shares.map((s) => (
            <ShareRow key={s.id} share={s} endpoint={endpoint} hidden={hidden} onDone={onDone} />
          ))}
        </tbody>
      </table>
    </ScrollArea>
  );
}

const stateClass = {
  active: "text-green-800",
  expired: "text-neutral-600",
  revoked: "text-red-700",
};

function ShareRow({
  share: s,
  endpoint,
  hidden,
  onDone,
}: {
  share: ShareSummary;
  endpoint: string;
  hidden: React.ReactNode;
  onDone: () => void;
}) {
  const fetcher = useFetcher<Reply>();
  const [confirming, setConfirming] = useState(false);
  useOnReply(fetcher, onDone);
  const daysId = `share-${s.id}-days`;
  return (
    <tr data-share-id={s.id} data-share-state={s.state}>
      <td className={tdClass}>
        <When date={s.createdAt} />
        <span className="block text-xs text-neutral-500">by {s.createdBy.name}</span>
      </td>
      <td className={`${tdClass} max-w-xs break-words`}>
        {s.note || <span className="text-neutral-400">—</span>}
      </td>
      <td className={`${tdClass} font-medium ${stateClass[s.state]}`}>
        {shareStateLabels[s.state]}
      </td>
      <td className={tdClass}>{s.state === "revoked" ? "—" : <When date={s.expiresAt} />}</td>
      <td className={`${tdClass} tabular-nums`}>
        {s.viewCount}
        {s.lastViewedAt ? (
          <span className="block text-xs text-neutral-500">
            last <When date={s.lastViewedAt} />
          </span>
        ) : null}
      </td>
      <td className={tdClass}>{s.allowRawDownload ? "allowed" : "no"}</td>
      <td className={tdClass}>
        {!s.canManage ? (
          <span className="text-xs text-neutral-500">only its sharer or an admin</span>
        ) : s.state === "revoked" ? (
          <span className="text-xs text-neutral-500">
            revoked <When date={s.revokedAt} />
          </span>
        ) : (
          <div className="flex flex-wrap items-end gap-2">
            <fetcher.Form method="post" action={endpoint} className="flex items-end gap-2">
              <CsrfInput />
              {hidden}
              <input type="hidden" name="intent" value="extend" />
              <input type="hidden" name="shareId" value={s.id} />
              <div>
                <label htmlFor={daysId} className="block text-xs text-neutral-600">
                  Days from now
                </label>
                <input
                  id={daysId}
                  name="expiresInDays"
                  inputMode="numeric"
                  defaultValue={SHARE_DEFAULT_DAYS}
                  className={`${inputClass} w-20`}
                />
              </div>
              <SubmitButton tone="secondary">Extend</SubmitButton>
            </fetcher.Form>
            {confirming ? (
              <fetcher.Form method="post" action={endpoint} className="flex items-center gap-2">
                <CsrfInput />
                {hidden}
                <input type="hidden" name="intent" value="revoke" />
                <input type="hidden" name="shareId" value={s.id} />
                <SubmitButton tone="danger">Yes, revoke</SubmitButton>
                <button
                  type="button"
                  className="text-sm underline"
                  onClick={() => setConfirming(false)}
                >
                  Keep it
                </button>
              </fetcher.Form>
            ) : (
              <button
                type="button"
                onClick={() => setConfirming(true)}
                className="rounded-md border border-red-300 bg-white px-4 py-2 text-sm font-medium text-red-700 hover:bg-red-50 focus-visible:outline-2 focus-visible:outline-indigo-600"
              >
                Revoke…
              </button>
            )}
          </div>
        )}
        {fetcher.data?.error ? <ErrorLine message={fetcher.data.error.message} /> : null}
        {fetcher.state === "idle" && fetcher.data?.notice ? (
          <p role="status" className="mt-1 text-xs text-green-800">
            {fetcher.data.notice}
          </p>
        ) : null}
      </td>
    </tr>
  );
}
