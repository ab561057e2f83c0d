import { parseWithZod } from "@conform-to/zod/v4";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { conditionLabels } from "~/lib/domain/drive-log-terms";
import {
  deleteCommentSchema,
  parseCommentSubject,
  postCommentSchema,
  type CommentSubject,
} from "~/lib/domain/comment-schema";
import { commentData } from "~/lib/data/comments.server";
import { idParam } from "~/lib/http/params";
import { plural } from "~/lib/base/plural";
import { appOrigin } from "~/lib/http/request.server";
import type { Route } from "./+types/comments";
import { requireAccess } from "~/lib/http/access.server";
import { Invalid } from "~/lib/domain/errors";
import { panelRoute } from "~/lib/http/edge.server";

/**
 * /vehicles/:vehicleId/comments?subject=log:ID | compare:ID,ID… — the comments panel's
 * resource route. GET (viewer and up) → { subject, comments, canPost, ranges }. POST (form with
 * the CSRF token): intent "post" (technician and up; body, optional pin) or "delete" (the
 * author, or an admin). Refusals come back as JSON { error: { code, message } } (panelRoute).
 */

const noStore = { "Cache-Control": "no-store" };

function subjectFrom(value: FormDataEntryValue | string | null): CommentSubject {
  const subject = parseCommentSubject(typeof value === "string" ? value : null);
  if (!subject) throw new Invalid("subject must be log:ID or compare:ID,ID (2 to 8 drive logs).");
  return subject;
}

export const loader = panelRoute(async ({ request, params }: Route.LoaderArgs) => {
  const current = await requireAccess(request, "viewer");
  const subject = subjectFrom(new URL(request.url).searchParams.get("subject"));
  const list = await commentData(current.team.id).list(idParam(params.vehicleId), subject, {
    userId: current.user.id,
    role: current.team.role,
  });
  return Response.json(list, { headers: noStore });
});

export const action = panelRoute(async ({ request, params }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const intent = form.get("intent");
  const vehicleId = idParam(params.vehicleId);
  const subject = subjectFrom(form.get("subject"));

  if (intent === "delete") {
    const current = await requireAccess(request, "viewer");
    const parsed = deleteCommentSchema.safeParse(Object.fromEntries(form));
    if (!parsed.success) throw new Invalid("No comment was chosen.");
    await commentData(current.team.id).remove(vehicleId, parsed.data.commentId, {
      userId: current.user.id,
      role: current.team.role,
    });
    return Response.json({ intent, notice: "The comment is deleted." }, { headers: noStore });
  }

  if (intent !== "post") throw new Invalid("Unknown action.");
  const current = await requireAccess(request, "technician");
  const comments = commentData(current.team.id);
  const { vehicle, logs } = await comments.checkSubject(vehicleId, subject);
  const submission = parseWithZod(form, { schema: postCommentSchema });
  if (submission.status !== "success")
    return Response.json({ intent, result: submission.reply() }, { status: 400, headers: noStore });
  const { body, pinKind, pinValue } = submission.value;
  const pin = pinKind === "time" ? { timeS: pinValue } : pinKind === "rpm" ? { rpm: pinValue } : {};
  const problem = await comments.pinProblem(subject, pin);
  if (problem)
    return Response.json(
      { intent, result: submission.reply({ fieldErrors: { pinValue: [problem] } }) },
      { status: 400, headers: noStore },
    );
  const id = await comments.create({
    vehicleId,
    subject,
    author: { userId: current.user.id, role: current.team.role },
    body,
    pin,
  });
  const origin = appOrigin(request);
  const link =
    subject.kind === "log"
      ? `${origin}/vehicles/${vehicle.id}/logs/${subject.logIds[0]}#comments`
      : `${origin}/vehicles/${vehicle.id}/compare?logs=${subject.logIds.join(",")}#comments`;
  const what =
    subject.kind === "log"
      ? `the drive log "${conditionLabels[logs[0]!.condition]}${logs[0]!.testDate ? `, ${logs[0]!.testDate}` : ""}" of ${vehicle.name} (${vehicle.identifier})`
      : `a comparison of ${logs.length} drive logs of ${vehicle.name} (${vehicle.identifier})`;
  const notified = await comments.notifyMentions({
    body,
    author: { id: current.user.id, name: current.user.name },
    link,
    what,
  });
  return Response.json(
    {
      intent,
      id,
      result: submission.reply({ resetForm: true }),
      notice: notified.length
        ? `Comment posted; ${notified.join(", ")} ${plural(notified.length, "was", "were")} notified by e-mail.`
        : "Comment posted.",
    },
    { status: 201, headers: noStore },
  );
});
