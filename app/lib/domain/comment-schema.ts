import { z } from "zod";

// Comments on a drive log or a comparison (issue 7): the subject key, the form schema shared by
// the comments panel and its resource route, and the JSON the panel reads.

export const COMMENT_MAX = 2000;

export type CommentSubject =
  | { kind: "log"; key: string; logIds: [number] }
  | { kind: "compare"; key: string; logIds: number[] };

/**
 * "log:ID" or "compare:ID,ID…" (2–8 ids). A comparison's ids are sorted in the key, so its
 * comments follow it whichever log is the reference. Anything else is null.
 */
export function parseCommentSubject(value: string | null | undefined): CommentSubject | null {
  if (!value) return null;
  const log = /^log:(\d{1,15})$/.exec(value);
  if (log) {
    const id = Number(log[1]);
    return Number.isSafeInteger(id) && id > 0
      ? { kind: "log", key: `log:${id}`, logIds: [id] }
      : null;
  }
  const compare = /^compare:(\d{1,15}(?:,\d{1,15}){1,7})$/.exec(value);
  if (compare) {
    const ids = [...new Set(compare[1]!.split(",").map(Number))].sort((a, b) => a - b);
    if (ids.length < 2 || ids.some((id) => !Number.isSafeInteger(id) || id < 1)) return null;
    return { kind: "compare", key: `compare:${ids.join(",")}`, logIds: ids };
  }
  return null;
}

export const PIN_KINDS = ["none", "time", "rpm"] as const;
export type PinKind = (typeof PIN_KINDS)[number];

const pinValue = z.preprocess(
  (v) =>
    v === "" || v === undefined || v === null
      ? undefined
      : typeof v === "string"
        ? Number(v.replace(",", "."))
        : v,
  z.number({ error: "Enter the pin as a number." }).finite("Enter the pin as a number.").optional(),
);

export const postCommentSchema = z
  .object({
    intent: z.literal("post"),
    body: z
      .string({ error: "Write the comment first." })
      .trim()
      .min(1, "Write the comment first.")
      .max(COMMENT_MAX, `A comment has at most ${COMMENT_MAX} characters.`),
    pinKind: z.enum(PIN_KINDS, { error: "Choose what to pin the comment to." }).default("none"),
    pinValue,
  })
  .superRefine((v, ctx) => {
    if (v.pinKind === "none") return;
    if (v.pinValue === undefined) {
      ctx.addIssue({
        code: "custom",
        path: ["pinValue"],
        message:
          v.pinKind === "time" ? "Enter the time in seconds." : "Enter the engine speed in rpm.",
      });
      return;
    }
    if (v.pinKind === "time" && v.pinValue < 0)
      ctx.addIssue({ code: "custom", path: ["pinValue"], message: "A time is 0 s or later." });
    if (v.pinKind === "rpm" && (v.pinValue <= 0 || v.pinValue > 20000))
      ctx.addIssue({
        code: "custom",
        path: ["pinValue"],
        message: "An engine speed is above 0 and at most 20000 rpm.",
      });
  });

export const deleteCommentSchema = z.object({
  intent: z.literal("delete"),
  commentId: z.coerce.number({ error: "No comment was chosen." }).int().positive(),
});

/** One comment as GET /vehicles/:vehicleId/comments?subject=… lists it. */
export interface CommentView {
  id: number;
  body: string;
  author: { id: number | null; name: string };
  pinTimeS: number | null;
  pinRpm: number | null;
  createdAt: string;
  edited: boolean;
  /** The caller wrote it (or is an admin): they may delete it. */
  canDelete: boolean;
}

export interface CommentsResponse {
  subject: string;
  comments: CommentView[];
  canPost: boolean;
  /** What a pin may be for this subject, from its analyses; null until one has finished. */
  ranges: { durationS: number; rpmMin: number; rpmMax: number } | null;
}
