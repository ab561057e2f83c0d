/** The links made so far (./share-panel), each with extend and revoke for its sharer or an admin. */
import { useState } from "react";
import { useFetcher } from "react-router";
import { SHARE_DEFAULT_DAYS, shareStateLabels, type ShareSummary } from "~/lib/domain/share-schema";
import { CsrfInput } from "./csrf-input";
import { useOnReply } from "./fetcher-form";
import { ErrorLine, SubmitButton } from "./form";
import { inputClass } from "./form-fields";
import { tableClass, tdClass, thClass, When } from "./page";
import { ScrollArea } from "./scroll-area";
import type { ShareReply } from "./share-forms";

export function ShareTable({
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
  const fetcher = useFetcher<ShareReply>();
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
