import type { SubmissionResult } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import type { AppLoadContext } from "react-router";
import { audit } from "../data/audit.server";
import { assertCsrf } from "./csrf.server";
import { readForm } from "./forms.server";
import { requireTeamRole, type CurrentUser, type TeamRole } from "./permissions.server";
import { appOrigin, clientIp } from "./request.server";
import { countText } from "../base/plural";
import { emailShare, type ShareSubject } from "../data/share-mail.server";
import {
  createShareSchema,
  emailShareSchema,
  extendShareSchema,
  revokeShareSchema,
  type ShareSummary,
} from "../domain/share-schema";
import { createShare, extendShare, listShares, revokeShare, shareUrl } from "../data/shares.server";

/**
 * The server side of the share panel (app/components/share-panel.tsx) for one subject: a drive
 * log (app/routes/drive-log.share.ts) or a comparison (app/routes/comparison.share.ts). Engineers
 * and admins only; every refusal comes back as JSON { error: { status, message } } with its
 * status, so the panel can say what went wrong without leaving the page.
 */

type Signed = CurrentUser & { team: TeamRole };
export type SubjectResolver = (current: Signed, form?: FormData) => Promise<ShareSubject>;

const noStore = { "Cache-Control": "no-store" };

async function refusal(error: unknown): Promise<Response> {
  // A GET without a session is redirected to sign-in like every other GET (requireUser);
  // such a redirect passes as it is, with its Location.
  if (error instanceof Response && error.status >= 300 && error.status < 400) throw error;
  if (error instanceof Response && !(error.headers.get("Content-Type") ?? "").includes("json")) {
    const message = (await error.text()) || "Request refused.";
    return Response.json(
      { error: { status: error.status, message } },
      { status: error.status, headers: noStore },
    );
  }
  throw error;
}

/** GET: the subject's share links (all of the team's for it), newest first. */
export async function sharePanelLoader(
  request: Request,
  resolve: SubjectResolver,
): Promise<Response> {
  try {
    const current = await requireTeamRole(request, "engineer");
    const subject = await resolve(current);
    const caller = { userId: current.user.id, role: current.team.role };
    let shares: ShareSummary[];
    if (subject.kind === "log") {
      shares = await listShares(current.team.id, caller, { logId: subject.logId });
    } else {
      // The same set of drive logs is the same comparison: the page orders them by its rule.
      const setOf = (ids: number[]) => [...ids].sort((a, b) => a - b).join(",");
      const key = setOf(subject.logIds);
      shares = (await listShares(current.team.id, caller, { vehicleId: subject.vehicleId })).filter(
        (s) => s.kind === "comparison" && setOf(s.logIds) === key,
      );
    }
    return Response.json({ shares }, { headers: noStore });
  } catch (error) {
    return refusal(error);
  }
}

export type SharePanelReply =
  | {
      intent: "create";
      result: ReturnType<typeof replyOf>;
      created?: { id: number; url: string; expiresAt: string };
    }
  | { intent: "email"; result: ReturnType<typeof replyOf>; notice?: string }
  | { intent: "extend" | "revoke"; notice: string; share: ShareSummary }
  | { error: { status: number; message: string } };

function replyOf(
  submission: { reply: (o?: { resetForm?: boolean }) => unknown },
  reset = false,
): SubmissionResult<string[]> {
  return submission.reply(reset ? { resetForm: true } : undefined) as SubmissionResult<string[]>;
}

/** POST with intent create, extend, revoke or email. CSRF first, then the role. */
export async function sharePanelAction(
  request: Request,
  context: AppLoadContext,
  resolve: SubjectResolver,
): Promise<Response> {
  try {
    const form = await readForm(request);
    await assertCsrf(request, form);
    const current = await requireTeamRole(request, "engineer");
    const subject = await resolve(current, form);
    const caller = { userId: current.user.id, role: current.team.role };
    const teamId = current.team.id;
    const ip = clientIp(context);
    const actor = { id: current.user.id, email: current.user.email };
    const where =
      subject.kind === "log"
        ? `drive log ${subject.logId}`
        : `comparison ${subject.logIds.join(",")}`;
    const intent = form.get("intent");

    if (intent === "create") {
      const submission = parseWithZod(form, { schema: createShareSchema });
      if (submission.status !== "success") {
        return Response.json(
          { intent, result: replyOf(submission) },
          { status: 400, headers: noStore },
        );
      }
      const { expiresInDays, note, allowRawDownload } = submission.value;
      const made = await createShare({
        teamId,
        caller,
        subject:
          subject.kind === "log"
            ? { kind: "log", logId: subject.logId }
            : { kind: "comparison", vehicleId: subject.vehicleId, logIds: subject.logIds },
        expiresInDays,
        note,
        allowRawDownload,
      });
      await audit({
        teamId,
        actor,
        action: "share-created",
        detail: `share ${made.id} of ${where}, ${expiresInDays} days${allowRawDownload ? ", raw file allowed" : ""}`,
        ip,
      });
      const reply: SharePanelReply = {
        intent,
        result: replyOf(submission, true),
        created: {
          id: made.id,
          url: shareUrl(appOrigin(request), made.token),
          expiresAt: made.expiresAt.toISOString(),
        },
      };
      return Response.json(reply, { status: 201, headers: noStore });
    }

    if (intent === "email") {
      const submission = parseWithZod(form, { schema: emailShareSchema });
      if (submission.status !== "success") {
        return Response.json(
          { intent, result: replyOf(submission) },
          { status: 400, headers: noStore },
        );
      }
      const { recipients, message, expiresInDays, allowRawDownload } = submission.value;
      const sent = await emailShare({
        teamId,
        teamName: current.team.name,
        caller: { ...caller, name: current.user.name },
        subject,
        recipients,
        message,
        expiresInDays,
        allowRawDownload,
        origin: appOrigin(request),
      });
      if (sent.shareId) {
        await audit({
          teamId,
          actor,
          action: "share-created",
          detail: `share ${sent.shareId} of ${where}, ${expiresInDays} days, for e-mail`,
          ip,
        });
      }
      await audit({
        teamId,
        actor,
        action: "share-emailed",
        detail: `${where} to ${recipients.length} address(es): ${sent.members} team member(s) with the in-app link, ${sent.guests} with share link ${sent.shareId ?? "—"}`,
        ip,
      });
      const parts = [
        sent.guests ? `${sent.guests} with a share link` : null,
        sent.members ? `${countText(sent.members, "team member")} with the normal link` : null,
      ].filter(Boolean);
      const reply: SharePanelReply = {
        intent,
        result: replyOf(submission, true),
        notice: `Sent to ${countText(recipients.length, "address", "addresses")}: ${parts.join(", ")}.`,
      };
      return Response.json(reply, { headers: noStore });
    }

    if (intent === "extend") {
      const parsed = extendShareSchema.safeParse(Object.fromEntries(form));
      if (!parsed.success) {
        const message = parsed.error.issues[0]?.message ?? "Choose how many days.";
        return Response.json(
          { error: { status: 400, message } },
          { status: 400, headers: noStore },
        );
      }
      const share = await extendShare(
        teamId,
        caller,
        parsed.data.shareId,
        parsed.data.expiresInDays,
      );
      await audit({
        teamId,
        actor,
        action: "share-extended",
        detail: `share ${share.id} to ${share.expiresAt}`,
        ip,
      });
      const reply: SharePanelReply = {
        intent,
        share,
        notice: `The link works for ${countText(parsed.data.expiresInDays, "more day")}.`,
      };
      return Response.json(reply, { headers: noStore });
    }

    if (intent === "revoke") {
      const parsed = revokeShareSchema.safeParse(Object.fromEntries(form));
      if (!parsed.success) {
        return Response.json(
          { error: { status: 400, message: "No share link was chosen." } },
          { status: 400, headers: noStore },
        );
      }
      const share = await revokeShare(teamId, caller, parsed.data.shareId);
      await audit({ teamId, actor, action: "share-revoked", detail: `share ${share.id}`, ip });
      const reply: SharePanelReply = {
        intent,
        share,
        notice: "The link is revoked: opening it now shows that it is no longer available.",
      };
      return Response.json(reply, { headers: noStore });
    }
    return Response.json(
      { error: { status: 400, message: "Unknown action." } },
      { status: 400, headers: noStore },
    );
  } catch (error) {
    return refusal(error);
  }
}
