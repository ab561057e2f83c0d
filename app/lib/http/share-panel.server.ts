import type { SubmissionResult } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import type { AppLoadContext } from "react-router";
import { countText } from "../base/plural";
import { audit } from "../data/audit.server";
import { emailShare } from "../data/share-mail.server";
import {
  createShare,
  extendShare,
  revokeShare,
  sharesOfSubject,
  shareUrl,
} from "../data/shares.server";
import { Invalid } from "../domain/errors";
import {
  createShareSchema,
  emailShareSchema,
  extendShareSchema,
  revokeShareSchema,
  type ShareSubject,
  type ShareSummary,
} from "../domain/share-schema";
import { requireAccess, type Access } from "./access.server";
import { assertCsrf } from "./csrf.server";
import { panelRoute } from "./edge.server";
import { readForm } from "./forms.server";
import { appOrigin, clientIp } from "./request.server";

/**
 * The share panel's loader and action (app/components/share-panel.tsx), for the two routes that
 * name a subject: a drive log (app/routes/drive-log.share.ts) and a comparison
 * (app/routes/comparison.share.ts). Engineers and admins only. The links themselves are
 * app/lib/data/shares.server.ts, the e-mail app/lib/data/share-mail.server.ts; this is the
 * form's side: CSRF, the intent, its zod schema, the audit line and the reply. Refusals leave
 * through panelRoute as JSON { error: { code, message } }.
 */

interface PanelArgs {
  request: Request;
  params: Readonly<Record<string, string | undefined>>;
  context: AppLoadContext;
}

/** The subject a route's URL (and, for a post, its form) names, checked against the team. */
export type SubjectResolver = (
  args: PanelArgs,
  access: Access,
  form?: FormData,
) => Promise<ShareSubject>;

const noStore = { "Cache-Control": "no-store" };

/** GET: the subject's share links (all of the team's for it), newest first. */
export function sharePanelLoader(resolve: SubjectResolver) {
  return panelRoute(async (args: PanelArgs) => {
    const access = await requireAccess(args.request, "engineer");
    const subject = await resolve(args, access);
    const shares = await sharesOfSubject(access.teamId, access, subject);
    return Response.json({ shares }, { headers: noStore });
  });
}

export type SharePanelReply =
  | {
      intent: "create";
      result: ReturnType<typeof replyOf>;
      created?: { id: number; url: string; expiresAt: string };
    }
  | { intent: "email"; result: ReturnType<typeof replyOf>; notice?: string }
  | { intent: "extend" | "revoke"; notice: string; share: ShareSummary }
  | { error: { code: string; message: string } };

function replyOf(
  submission: { reply: (o?: { resetForm?: boolean }) => unknown },
  reset = false,
): SubmissionResult<string[]> {
  return submission.reply(reset ? { resetForm: true } : undefined) as SubmissionResult<string[]>;
}

const answer = (reply: SharePanelReply, status = 200) =>
  Response.json(reply, { status, headers: noStore });

/** POST with intent create, extend, revoke or email. CSRF first, then the role. */
export function sharePanelAction(resolve: SubjectResolver) {
  return panelRoute(async (args: PanelArgs) => {
    const { request, context } = args;
    const form = await readForm(request);
    await assertCsrf(request, form);
    const access = await requireAccess(request, "engineer");
    const subject = await resolve(args, access, form);
    const { teamId } = access;
    const log = { teamId, actor: access.user, ip: clientIp(context) };
    const where =
      subject.kind === "log"
        ? `drive log ${subject.logId}`
        : subject.kind === "signoff"
          ? `sign-off ${subject.signoffId}`
          : `comparison ${subject.logIds.join(",")}`;
    const intent = form.get("intent");

    if (intent === "create") {
      const submission = parseWithZod(form, { schema: createShareSchema });
      if (submission.status !== "success")
        return answer({ intent, result: replyOf(submission) }, 400);
      const { expiresInDays, note, allowRawDownload } = submission.value;
      const made = await createShare({
        teamId,
        caller: access,
        subject,
        expiresInDays,
        note,
        allowRawDownload,
      });
      await audit({
        ...log,
        action: "share-created",
        detail: `share ${made.id} of ${where}, ${expiresInDays} days${allowRawDownload && subject.kind !== "signoff" ? ", raw file allowed" : ""}`,
      });
      const url = shareUrl(appOrigin(request), made.token);
      const created = { id: made.id, url, expiresAt: made.expiresAt.toISOString() };
      return answer({ intent, result: replyOf(submission, true), created }, 201);
    }

    if (intent === "email") {
      const submission = parseWithZod(form, { schema: emailShareSchema });
      if (submission.status !== "success")
        return answer({ intent, result: replyOf(submission) }, 400);
      const { recipients, message, expiresInDays, allowRawDownload } = submission.value;
      const sent = await emailShare({
        teamId,
        teamName: access.team.name,
        caller: { userId: access.userId, role: access.role, name: access.user.name },
        subject,
        recipients,
        message,
        expiresInDays,
        allowRawDownload,
        origin: appOrigin(request),
      });
      if (sent.shareId) {
        await audit({
          ...log,
          action: "share-created",
          detail: `share ${sent.shareId} of ${where}, ${expiresInDays} days, for e-mail`,
        });
      }
      await audit({
        ...log,
        action: "share-emailed",
        detail: `${where} to ${recipients.length} address(es): ${sent.members} team member(s) with the in-app link, ${sent.guests} with share link ${sent.shareId ?? "—"}`,
      });
      const parts = [
        sent.guests ? `${sent.guests} with a share link` : null,
        sent.members ? `${countText(sent.members, "team member")} with the normal link` : null,
      ].filter(Boolean);
      const notice = `Sent to ${countText(recipients.length, "address", "addresses")}: ${parts.join(", ")}.`;
      return answer({ intent, result: replyOf(submission, true), notice });
    }

    if (intent === "extend") {
      const parsed = extendShareSchema.safeParse(Object.fromEntries(form));
      if (!parsed.success)
        throw new Invalid(parsed.error.issues[0]?.message ?? "Choose how many days.");
      const { shareId, expiresInDays } = parsed.data;
      const share = await extendShare(teamId, access, shareId, expiresInDays);
      await audit({
        ...log,
        action: "share-extended",
        detail: `share ${share.id} to ${share.expiresAt}`,
      });
      const notice = `The link works for ${countText(expiresInDays, "more day")}.`;
      return answer({ intent, share, notice });
    }

    if (intent === "revoke") {
      const parsed = revokeShareSchema.safeParse(Object.fromEntries(form));
      if (!parsed.success) throw new Invalid("No share link was chosen.");
      const share = await revokeShare(teamId, access, parsed.data.shareId);
      await audit({ ...log, action: "share-revoked", detail: `share ${share.id}` });
      const notice = "The link is revoked: opening it now shows that it is no longer available.";
      return answer({ intent, share, notice });
    }
    throw new Invalid("Unknown action.");
  });
}
