import { getSelectProps } from "@conform-to/react";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useMemo, useState } from "react";
import { useFetcher } from "react-router";
import {
  COMMENT_MAX,
  postCommentSchema,
  type CommentsResponse,
  type CommentView,
} from "~/lib/domain/comment-schema";
import type { ChartMarker } from "./charts/types";
import { CsrfInput } from "./csrf-input";
import { useOnReply, type FetcherReply } from "./fetcher-form";
import { SubmitButton, SchemaForm, useSchemaForm } from "./form";
import { inputClass, InputField, TextAreaField } from "./form-fields";
import { EmptyState, When } from "./page";
import { fetchJson, QueryState } from "./query-state";

/**
 * Comments on a drive log or a comparison (issue 7), with optional pins to a time (s) or an
 * engine speed (rpm) that the charts draw as markers. Reads GET /vehicles/:vehicleId/comments
 * with TanStack Query and posts there with a fetcher; the server checks the role again
 * (technicians and up post, viewers read, authors delete their own).
 *
 * `subject` is "log:ID" or "compare:ID,ID…" (sorted ids).
 */

function commentsUrl(vehicleId: number, subject: string) {
  return `/vehicles/${vehicleId}/comments?subject=${encodeURIComponent(subject)}`;
}

export function commentsQueryKey(vehicleId: number, subject: string) {
  return ["comments", vehicleId, subject] as const;
}

/** The subject's comments (shared by the panel and useCommentMarkers: one request). */
export function useComments(vehicleId: number, subject: string) {
  return useQuery({
    queryKey: commentsQueryKey(vehicleId, subject),
    queryFn: (): Promise<CommentsResponse> =>
      fetchJson<CommentsResponse>(
        commentsUrl(vehicleId, subject),
        "The comments",
        (body) => !!body.comments,
      ),
    staleTime: 10_000,
  });
}

function pinText(c: Pick<CommentView, "pinTimeS" | "pinRpm">): string | null {
  if (c.pinTimeS !== null) return `${Number(c.pinTimeS.toFixed(2))} s`;
  if (c.pinRpm !== null) return `${Math.round(c.pinRpm)} rpm`;
  return null;
}

function shortLabel(c: CommentView): string {
  const text = c.body.replace(/\s+/g, " ");
  return `${c.author.name}: ${text.length > 60 ? `${text.slice(0, 57)}…` : text}`;
}

/** The pinned comments as chart markers ({ id, label, timeS?, rpm? }) for <DriveLogCharts markers>. */
export function useCommentMarkers(vehicleId: number, subject: string): ChartMarker[] {
  const { data } = useComments(vehicleId, subject);
  return useMemo(
    () =>
      (data?.comments ?? [])
        .filter((c) => c.pinTimeS !== null || c.pinRpm !== null)
        .map((c) => ({
          id: c.id,
          label: shortLabel(c),
          ...(c.pinTimeS !== null ? { timeS: c.pinTimeS } : {}),
          ...(c.pinRpm !== null ? { rpm: c.pinRpm } : {}),
        })),
    [data],
  );
}

export function CommentsPanel({ vehicleId, subject }: { vehicleId: number; subject: string }) {
  const query = useComments(vehicleId, subject);
  const queryClient = useQueryClient();
  const refresh = () =>
    void queryClient.invalidateQueries({ queryKey: commentsQueryKey(vehicleId, subject) });
  return (
    <section
      id="comments"
      aria-labelledby="comments-title"
      className="rounded-lg border border-neutral-200 bg-white p-6 shadow-xs"
      data-comments-panel
    >
      <h2 id="comments-title" className="text-base font-semibold">
        Comments
      </h2>
      <div className="mt-4 space-y-4" aria-busy={query.isPending}>
        <QueryState
          query={query}
          loadingLabel="Loading the comments"
          height="h-20"
          onRetry={refresh}
        >
          {(data) => (
            <>
              {data.comments.length === 0 ? (
                <EmptyState>
                  No comments yet.
                  {data.canPost
                    ? " Note what happened on the test drive, e.g. “A/C compressor engaged at 32 s”, and pin it to the time or engine speed."
                    : ""}
                </EmptyState>
              ) : (
                <ol className="space-y-3" aria-label="Comments, oldest first">
                  {data.comments.map((c) => (
                    <CommentItem
                      key={c.id}
                      comment={c}
                      vehicleId={vehicleId}
                      subject={subject}
                      onDone={refresh}
                    />
                  ))}
                </ol>
              )}
              {data.canPost ? (
                <CommentForm
                  vehicleId={vehicleId}
                  subject={subject}
                  ranges={data.ranges}
                  onDone={refresh}
                />
              ) : (
                <p className="text-sm text-neutral-600">
                  Viewers read comments; technicians and engineers write them.
                </p>
              )}
            </>
          )}
        </QueryState>
      </div>
    </section>
  );
}

function CommentItem({
  comment: c,
  vehicleId,
  subject,
  onDone,
}: {
  comment: CommentView;
  vehicleId: number;
  subject: string;
  onDone: () => void;
}) {
  const fetcher = useFetcher<FetcherReply>();
  useOnReply(fetcher, onDone);
  const pin = pinText(c);
  return (
    <li className="rounded-md border border-neutral-200 px-4 py-3" data-comment-id={c.id}>
      <p className="text-xs text-neutral-500">
        <span className="font-medium text-neutral-800">{c.author.name}</span>,{" "}
        <When date={c.createdAt} />
        {c.edited ? " (edited)" : ""}
        {pin ? (
          <span
            className="ml-2 inline-block rounded-full bg-indigo-50 px-2 py-0.5 font-medium text-indigo-800"
            data-comment-pin={c.pinRpm !== null ? "rpm" : "time"}
          >
            pinned at {pin}
          </span>
        ) : null}
      </p>
      <p className="mt-1 text-sm whitespace-pre-line text-neutral-900">{c.body}</p>
      {c.canDelete ? (
        <fetcher.Form method="post" action={`/vehicles/${vehicleId}/comments`} className="mt-2">
          <CsrfInput />
          <input type="hidden" name="intent" value="delete" />
          <input type="hidden" name="subject" value={subject} />
          <input type="hidden" name="commentId" value={c.id} />
          <button type="submit" className="text-xs text-red-700 underline underline-offset-2">
            Delete<span className="sr-only"> the comment of {c.author.name}</span>
          </button>
        </fetcher.Form>
      ) : null}
      {fetcher.data?.error ? (
        <p role="alert" className="mt-1 text-xs text-red-700">
          {fetcher.data.error.message}
        </p>
      ) : null}
    </li>
  );
}

function CommentForm({
  vehicleId,
  subject,
  ranges,
  onDone,
}: {
  vehicleId: number;
  subject: string;
  ranges: CommentsResponse["ranges"];
  onDone: () => void;
}) {
  const fetcher = useFetcher<FetcherReply>();
  const reply = fetcher.data;
  const [form, fields] = useSchemaForm("comment-new", postCommentSchema, reply?.result, {
    pinKind: "none",
  });
  const [pinKind, setPinKind] = useState("none");
  useOnReply(fetcher, () => {
    setPinKind("none");
    onDone();
  });
  const pinHint =
    pinKind === "time"
      ? ranges
        ? `Seconds from the start of the recording, 0 to ${ranges.durationS.toFixed(1)} s.`
        : "Seconds from the start of the recording."
      : pinKind === "rpm"
        ? ranges
          ? `Engine speed, ${ranges.rpmMin} to ${ranges.rpmMax} rpm (the recorded range).`
          : "Engine speed in rpm."
        : undefined;
  // Controlled here (the pin field follows the choice), so conform's defaultValue is left out.
  const { defaultValue: _unused, key: selectKey, ...selectProps } = getSelectProps(fields.pinKind);
  return (
    <SchemaForm
      fetcher={fetcher}
      action={`/vehicles/${vehicleId}/comments`}
      form={form}
      intent="post"
      hidden={<input type="hidden" name="subject" value={subject} />}
      className="space-y-3"
    >
      <TextAreaField
        label="New comment"
        meta={fields.body}
        rows={3}
        hint={`Up to ${COMMENT_MAX} characters. Mention a colleague with @ and their name or e-mail name (e.g. @erik) to notify them by e-mail.`}
      />
      <div className="grid gap-4 sm:grid-cols-[14rem_14rem]">
        <div>
          <label htmlFor={fields.pinKind.id} className="block text-sm font-medium text-neutral-800">
            Pin to
          </label>
          <select
            {...selectProps}
            key={selectKey}
            value={pinKind}
            onChange={(e) => setPinKind(e.target.value)}
            className={`mt-1 ${inputClass}`}
          >
            <option value="none">Nothing (a general remark)</option>
            <option value="time">A time in the recording</option>
            <option value="rpm">An engine speed</option>
          </select>
        </div>
        {pinKind !== "none" ? (
          <InputField
            label={pinKind === "time" ? "Time" : "Engine speed"}
            unit={pinKind === "time" ? "s" : "rpm"}
            meta={fields.pinValue}
            numeric
            hint={pinHint}
          />
        ) : null}
      </div>
      <SubmitButton>{fetcher.state === "submitting" ? "Posting…" : "Post comment"}</SubmitButton>
      {reply?.error ? (
        <p role="alert" className="text-sm text-red-700">
          {reply.error.message}
        </p>
      ) : null}
      {fetcher.state === "idle" && reply?.notice ? (
        <p role="status" className="text-sm text-green-800">
          {reply.notice}
        </p>
      ) : null}
    </SchemaForm>
  );
}
