import { parseWithZod } from "@conform-to/zod/v4";
import { data, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { Field, SubmitButton, SchemaForm, useSchemaForm } from "~/components/form";
import { AuthNote } from "~/components/auth-note";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { acceptInvitation, findInvitation, InvitationProblem } from "~/lib/data/invitations.server";
import { verifyPassword } from "~/lib/infra/password.server";
import { clientIp } from "~/lib/http/request.server";
import { roleLabels } from "~/lib/domain/roles";
import { startSession } from "~/lib/http/session.server";
import { nameField, newPasswordField, passwordField } from "~/lib/domain/validation";
import type { Route } from "./+types/accept-invitation";
import { pageRoute } from "~/lib/http/edge.server";
import { Gone } from "~/lib/domain/errors";

// A new colleague chooses a name and password; someone with an account already confirms theirs.
const newAccountSchema = z.object({ name: nameField, password: newPasswordField });
const existingSchema = z.object({ password: passwordField.min(1, "Enter your password.") });

export const meta = () => [{ title: "Join a team · Twistlog" }];

export const loader = pageRoute(async ({ params }: Route.LoaderArgs) => {
  const invitation = await findInvitation(params.token);
  if (!invitation) return { invitation: null };
  const { teamName, email, role, existingUser } = invitation;
  return { invitation: { teamName, email, role, hasAccount: !!existingUser } };
});

export const action = pageRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const invitation = await findInvitation(params.token);
  if (!invitation) throw new Gone("This invitation was already used, withdrawn or has expired.");
  const ip = clientIp(context);
  const existing = invitation.existingUser;
  let newAccount: { name: string; password: string } | null = null;
  if (existing) {
    const submission = parseWithZod(form, { schema: existingSchema });
    if (submission.status !== "success")
      return data(submission.reply({ hideFields: ["password"] }), { status: 400 });
    if (!(await verifyPassword(existing.passwordHash, submission.value.password))) {
      return data(
        submission.reply({
          formErrors: ["That is not the password of this account."],
          hideFields: ["password"],
        }),
        { status: 400 },
      );
    }
  } else {
    const submission = parseWithZod(form, { schema: newAccountSchema });
    if (submission.status !== "success")
      return data(submission.reply({ hideFields: ["password"] }), { status: 400 });
    newAccount = submission.value;
  }
  let userId: number;
  try {
    userId = await acceptInvitation(invitation, newAccount);
  } catch (error) {
    if (error instanceof InvitationProblem) throw new Gone(error.message);
    throw error;
  }
  await audit({
    teamId: invitation.teamId,
    actor: { id: userId, email: invitation.email },
    action: "invitation-accepted",
    detail: `as ${invitation.role}`,
    ip,
  });
  const setCookie = await startSession(request, userId, invitation.teamId, ip);
  throw redirect("/team", { headers: { "Set-Cookie": setCookie } });
});

export default function AcceptInvitation() {
  const { invitation } = useLoaderData<typeof loader>();
  const lastResult = useActionData<typeof action>();
  const schema = invitation?.hasAccount ? existingSchema : newAccountSchema;
  const [form, fields] = useSchemaForm("accept", schema as typeof newAccountSchema, lastResult);
  if (!invitation) {
    return (
      <AuthNote
        title="This invitation no longer works"
        link={{ to: "/sign-in", label: "Go to sign-in" }}
      >
        An invitation link works once, for 7 days, and an admin can withdraw it. Ask the admin who
        invited you for a new one.
      </AuthNote>
    );
  }
  return (
    <>
      <h1 className="text-xl font-semibold">Join {invitation.teamName}</h1>
      <p className="mt-2 text-sm text-neutral-600">
        You are invited as {roleLabels[invitation.role]}, with the address {invitation.email}.
      </p>
      <SchemaForm form={form} className="mt-6 space-y-4">
        {invitation.hasAccount ? (
          <Field
            label="Your Twistlog password"
            meta={fields.password}
            type="password"
            autoComplete="current-password"
            hint="You already have an account with this address."
          />
        ) : (
          <>
            <Field label="Your name" meta={fields.name} autoComplete="name" />
            <Field
              label="Choose a password"
              meta={fields.password}
              type="password"
              autoComplete="new-password"
              hint="At least 10 characters."
            />
          </>
        )}
        <SubmitButton>Join the team</SubmitButton>
      </SchemaForm>
    </>
  );
}
