import { parseWithZod } from "@conform-to/zod/v4";
import { data, useActionData } from "react-router";
import { z } from "zod";
import { Field, SubmitButton, SchemaForm, useSchemaForm } from "~/components/form";
import { AuthLink, AuthNote } from "~/components/auth-note";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { RESET_MINUTES } from "~/lib/domain/link-lifetimes";
import { requestPasswordReset } from "~/lib/data/password-reset.server";
import { appOrigin, clientIp } from "~/lib/http/request.server";
import { emailField } from "~/lib/domain/validation";
import type { Route } from "./+types/forgot-password";
import { pageRoute } from "~/lib/http/edge.server";

const schema = z.object({ email: emailField });

export const meta = () => [{ title: "Reset your password · Twistlog" }];

export const action = pageRoute(async ({ request, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const submission = parseWithZod(form, { schema });
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { email } = submission.value;
  const userId = await requestPasswordReset(email, appOrigin(request));
  if (userId) {
    await audit({
      teamId: null,
      actor: { id: userId, email },
      action: "password-reset-requested",
      ip: clientIp(context),
    });
  }
  // The same answer whether or not the address has an account.
  return { sent: email };
});

export default function ForgotPassword() {
  const result = useActionData<typeof action>();
  const sent = result && "sent" in result ? result.sent : null;
  const [form, fields] = useSchemaForm("forgot", schema, sent ? undefined : (result as never));
  if (sent) {
    return (
      <AuthNote
        title="Check your e-mail"
        status
        link={{ to: "/sign-in", label: "Back to sign-in" }}
      >
        If {sent} has a Twistlog account, a link to choose a new password is on its way. It works
        once, for {RESET_MINUTES} minutes.
      </AuthNote>
    );
  }
  return (
    <>
      <h1 className="text-xl font-semibold">Reset your password</h1>
      <p className="mt-2 text-sm text-neutral-600">We e-mail you a link to choose a new one.</p>
      <SchemaForm form={form} className="mt-6 space-y-4">
        <Field label="E-mail address" meta={fields.email} type="email" autoComplete="username" />
        <SubmitButton>Send the link</SubmitButton>
      </SchemaForm>
      <AuthLink to="/sign-in">Back to sign-in</AuthLink>
    </>
  );
}
