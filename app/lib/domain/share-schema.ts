import { z } from "zod";

// Share links (docs/architecture.md §3 "share link"): the limits and form schemas shared by the browser's
// hints, the share actions and the API (issue 7). Limits match app/lib/infra/db/schema-results.ts.

/** A share link works this many days unless the sharer chooses otherwise. */
export const SHARE_DEFAULT_DAYS = 14;
/** The longest a share link may work, counted from when it is made or extended. */
export const SHARE_MAX_DAYS = 90;
export const SHARE_NOTE_MAX = 500;
export const SHARE_MESSAGE_MAX = 1000;
/** At most this many addresses in one "send by e-mail". */
export const SHARE_MAX_RECIPIENTS = 10;

/** What the shared page says for a revoked or expired link (410) and for an unknown one (404). */
export const UNAVAILABLE_MESSAGE = "This link is no longer available.";
export const NOT_FOUND_MESSAGE = "There is no share link at this address.";

export const SHARE_STATES = ["active", "expired", "revoked"] as const;
export type ShareState = (typeof SHARE_STATES)[number];

export const shareStateLabels: Record<ShareState, string> = {
  active: "Active",
  expired: "Expired",
  revoked: "Revoked",
};

const daysMessage = `Choose a whole number of days from 1 to ${SHARE_MAX_DAYS}.`;

/** Days a link works: a whole number 1–90; empty means the default (14). */
export const expiresInDaysField = z.preprocess(
  (v) =>
    v === "" || v === undefined || v === null ? undefined : typeof v === "string" ? Number(v) : v,
  z
    .number({ error: daysMessage })
    .int(daysMessage)
    .min(1, daysMessage)
    .max(SHARE_MAX_DAYS, daysMessage)
    .default(SHARE_DEFAULT_DAYS),
);

export const noteField = z
  .string({ error: "The note is text." })
  .trim()
  .max(SHARE_NOTE_MAX, `A note has at most ${SHARE_NOTE_MAX} characters.`)
  .default("");

/** A checkbox: "on" when ticked (HTML forms), or a boolean (JSON). */
const checkbox = z.preprocess(
  (v) => v === "on" || v === "true" || v === true,
  z.boolean().default(false),
);

export const createShareSchema = z.object({
  intent: z.literal("create"),
  expiresInDays: expiresInDaysField,
  note: noteField,
  allowRawDownload: checkbox,
});

export const extendShareSchema = z.object({
  intent: z.literal("extend"),
  shareId: z.coerce.number({ error: "No share link was chosen." }).int().positive(),
  expiresInDays: expiresInDaysField,
});

export const revokeShareSchema = z.object({
  intent: z.literal("revoke"),
  shareId: z.coerce.number({ error: "No share link was chosen." }).int().positive(),
});

const addressPattern = /^[^\s@]+@[^\s@]+\.[^\s@]+$/;

/** "a@x.test, b@y.test" or one per line → distinct lower-case addresses. */
export const recipientsField = z
  .string({ error: "Enter at least one e-mail address." })
  .transform((s) => [
    ...new Set(
      s
        .split(/[\s,;]+/)
        .map((a) => a.trim().toLowerCase())
        .filter(Boolean),
    ),
  ])
  .superRefine((list, ctx) => {
    if (list.length === 0)
      ctx.addIssue({ code: "custom", message: "Enter at least one e-mail address." });
    if (list.length > SHARE_MAX_RECIPIENTS)
      ctx.addIssue({
        code: "custom",
        message: `At most ${SHARE_MAX_RECIPIENTS} addresses at a time.`,
      });
    const bad = list.find((a) => a.length > 254 || !addressPattern.test(a));
    if (bad)
      ctx.addIssue({
        code: "custom",
        message: `“${bad.slice(0, 60)}” is not an e-mail address (it looks like name@example.com).`,
      });
  });

export const emailShareSchema = z.object({
  intent: z.literal("email"),
  recipients: recipientsField,
  message: z
    .string()
    .trim()
    .max(SHARE_MESSAGE_MAX, `A message has at most ${SHARE_MESSAGE_MAX} characters.`)
    .default(""),
  expiresInDays: expiresInDaysField,
  allowRawDownload: checkbox,
});

/** The body of POST /api/v1/logs/:logId/shares. */
export const apiCreateShareSchema = z
  .object({
    expiresInDays: z
      .number({
        error: `expiresInDays must be a whole number of days from 1 to ${SHARE_MAX_DAYS}.`,
      })
      .int(`expiresInDays must be a whole number of days from 1 to ${SHARE_MAX_DAYS}.`)
      .min(1, `expiresInDays must be a whole number of days from 1 to ${SHARE_MAX_DAYS}.`)
      .max(
        SHARE_MAX_DAYS,
        `expiresInDays must be a whole number of days from 1 to ${SHARE_MAX_DAYS}.`,
      )
      .default(SHARE_DEFAULT_DAYS),
    note: z
      .string({ error: "note must be text." })
      .trim()
      .max(SHARE_NOTE_MAX, `note has at most ${SHARE_NOTE_MAX} characters.`)
      .default(""),
    allowRawDownload: z
      .boolean({ error: "allowRawDownload must be true or false." })
      .default(false),
  })
  .strict();

/** A share link as the share panel lists it (GET …/share, the API's list). */
export interface ShareSummary {
  id: number;
  kind: "log" | "comparison" | "signoff";
  vehicleId: number;
  logId: number | null;
  logIds: number[];
  /** kind "signoff": the sign-off shared (issue 16). */
  signoffId: number | null;
  note: string;
  allowRawDownload: boolean;
  createdBy: { id: number | null; name: string };
  createdAt: string;
  expiresAt: string;
  revokedAt: string | null;
  state: ShareState;
  viewCount: number;
  lastViewedAt: string | null;
  /** Whether the caller may extend or revoke it: its sharer, or an admin. */
  canManage: boolean;
}

/**
 * What a share link shows: one drive log, a comparison of 2 to 8 of one vehicle's logs, or a
 * sign-off's evidence and report (issue 16).
 */
export type ShareSubject =
  | { kind: "log"; vehicleId: number; logId: number }
  | { kind: "comparison"; vehicleId: number; logIds: number[] }
  | { kind: "signoff"; vehicleId: number; signoffId: number };
