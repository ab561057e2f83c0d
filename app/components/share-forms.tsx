/** The share panel's two forms (./share-panel): make a link, and send one by e-mail. */
import { useEffect, useRef, useState } from "react";
import { useFetcher } from "react-router";
import type { z } from "zod";
import {
  createShareSchema,
  emailShareSchema,
  SHARE_DEFAULT_DAYS,
  SHARE_MAX_DAYS,
  SHARE_MAX_RECIPIENTS,
} from "~/lib/domain/share-schema";
import { useOnReply, type FetcherReply } from "./fetcher-form";
import { ErrorLine, SubmitButton, SchemaForm, useSchemaForm } from "./form";
import { inputClass, InputField, TextAreaField } from "./form-fields";
import { When } from "./page";

/** The share route's reply; `created` carries a new link, shown once. */
export type ShareReply = FetcherReply & {
  created?: { id: number; url: string; expiresAt: string };
};

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

/** What both share forms are given: where they post, their hidden fields, and what ends them. */
interface ShareFormProps {
  endpoint: string;
  hidden: React.ReactNode;
  onDone: () => void;
  /** A sign-off's link never carries raw files: no checkbox for them. */
  noRaw?: boolean;
}

/** A share form's fetcher, its last reply and its fields (expiry preset to the default days). */
function useShareForm<S extends z.ZodType<unknown, Record<string, unknown>>>(
  id: string,
  schema: S,
  onDone: () => void,
) {
  const fetcher = useFetcher<ShareReply>();
  const reply = fetcher.data;
  const [form, fields] = useSchemaForm(id, schema, reply?.result, {
    expiresInDays: String(SHARE_DEFAULT_DAYS),
  });
  useOnReply(fetcher, onDone);
  return { fetcher, reply, form, fields };
}

export function CreateForm({ endpoint, hidden, onDone, noRaw }: ShareFormProps) {
  const { fetcher, reply, form, fields } = useShareForm("share-create", createShareSchema, onDone);
  const created = fetcher.state === "idle" ? reply?.created : undefined;
  return (
    <div className="space-y-4">
      <SchemaForm
        fetcher={fetcher}
        action={endpoint}
        form={form}
        intent="create"
        hidden={hidden}
        className="space-y-4"
      >
        <div className="grid gap-4 sm:grid-cols-[12rem_1fr]">
          <DaysField meta={fields.expiresInDays} />
          <TextAreaField
            label="Note"
            meta={fields.note}
            rows={2}
            hint="Optional; shown on the shared page, e.g. what to look at."
          />
        </div>
        {noRaw ? null : <RawCheckbox id="share-create-raw" />}
        <SubmitButton>
          {fetcher.state === "submitting" ? "Making the link…" : "Make share link"}
        </SubmitButton>
      </SchemaForm>
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

export function EmailForm({ endpoint, hidden, onDone, noRaw }: ShareFormProps) {
  const { fetcher, reply, form, fields } = useShareForm("share-email", emailShareSchema, onDone);
  return (
    <SchemaForm
      fetcher={fetcher}
      action={endpoint}
      form={form}
      intent="email"
      hidden={hidden}
      className="space-y-4"
    >
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
      {noRaw ? null : <RawCheckbox id="share-email-raw" />}
      <SubmitButton>{fetcher.state === "submitting" ? "Sending…" : "Send"}</SubmitButton>
      {reply?.error ? <ErrorLine message={reply.error.message} /> : null}
      {fetcher.state === "idle" && reply?.notice ? (
        <p role="status" className="text-sm text-green-800">
          {reply.notice}
        </p>
      ) : null}
    </SchemaForm>
  );
}
