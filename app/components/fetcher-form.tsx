/**
 * Forms that post with a fetcher to a JSON resource route (share links, comments) and stay on the
 * page: what such a route answers, and a hook for "the post went through". The form's frame is
 * SchemaForm (./form) with its `fetcher`.
 */
import type { SubmissionResult } from "@conform-to/react";
import { useEffect, useRef } from "react";

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
