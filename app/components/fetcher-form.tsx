/**
 * Forms that post with a fetcher to a JSON resource route (share links, comments) and stay on the
 * page: what such a route answers, a hook for "the post went through", and the form's frame.
 */
import type { SubmissionResult } from "@conform-to/react";
import { useEffect, useRef } from "react";
import type { FetcherWithComponents } from "react-router";
import { CsrfInput } from "./csrf-input";
import { FormError } from "./form";

/** A JSON resource route's answer to a fetcher's post; only the parts the panels read. */
export type FetcherReply = {
  intent?: string;
  /** conform's reply when the schema refused the form. */
  result?: SubmissionResult<string[]>;
  notice?: string;
  error?: { message: string };
};

/** Calls `onDone` once per successful reply of a fetcher (no error, no refused form). */
export function useOnReply(fetcher: { state: string; data?: FetcherReply }, onDone: () => void) {
  const seen = useRef<FetcherReply | undefined>(undefined);
  useEffect(() => {
    if (fetcher.state !== "idle" || !fetcher.data || fetcher.data === seen.current) return;
    seen.current = fetcher.data;
    if (!fetcher.data.error && fetcher.data.result?.status !== "error") onDone();
  });
}

/**
 * A schema form posted by `fetcher` to `action`: the CSRF token, the `hidden` fields that name
 * the subject, the intent and the form's own error come first; the fields are the children.
 */
export function FetcherSchemaForm<R>({
  fetcher,
  action,
  form,
  intent,
  hidden,
  className,
  children,
}: {
  fetcher: FetcherWithComponents<R>;
  action: string;
  form: {
    id: string;
    errorId: string;
    errors: string[] | undefined;
    onSubmit: (event: React.FormEvent<HTMLFormElement>) => void;
  };
  intent: string;
  hidden?: React.ReactNode;
  className: string;
  children: React.ReactNode;
}) {
  return (
    <fetcher.Form
      method="post"
      action={action}
      id={form.id}
      onSubmit={form.onSubmit}
      noValidate
      className={className}
    >
      <CsrfInput />
      {hidden}
      <input type="hidden" name="intent" value={intent} />
      <FormError id={form.errorId} errors={form.errors} />
      {children}
    </fetcher.Form>
  );
}
