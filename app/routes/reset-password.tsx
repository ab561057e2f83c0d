import { parseWithZod } from "@conform-to/zod/v4";
import { data, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { Field, SubmitButton, SchemaForm, useSchemaForm } from "~/components/form";
import { AuthNote } from "~/components/auth-note";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { completePasswordReset, findPasswordReset } from "~/lib/data/password-reset.server";
import { clientIp } from "~/lib/http/request.server";
import { newPasswordField } from "~/lib/domain/validation";
import type { Route } from "./+types/reset-password";
import { pageRoute } from "~/lib/http/edge.server";
import { Gone } from "~/lib/domain/errors";

const schema = z
  .object({ password: newPasswordField, confirm: z.string({ error: "Repeat the password." }) })
  .refine((v) => v.password === v.confirm, {
    path: ["confirm"],
    message: "The two passwords differ.",
  });

export const meta = () => [{ title: "Choose a new password · Twistlog" }];

export const loader = pageRoute(async ({ params }: Route.LoaderArgs) => {
  const reset = await findPasswordReset(params.token);
  return { email: reset?.email ?? null };
});

export const action = pageRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const reset = await findPasswordReset(params.token);
  if (!reset) throw new Gone("This link was already used or has expired.");
  const submission = parseWithZod(form, { schema });
  if (submission.status !== "success")
    return data(submission.reply({ hideFields: ["password", "confirm"] }), { status: 400 });
  if (!(await completePasswordReset(reset, submission.value.password))) {
    return data(submission.reply({ formErrors: ["This link was already used or has expired."] }), {
      status: 410,
    });
  }
  await audit({
    teamId: null,
    actor: { id: reset.userId, email: reset.email },
    action: "password-reset",
    detail: "every session ended",
    ip: clientIp(context),
  });
  throw redirect("/sign-in?notice=password-changed");
});

export default function ResetPassword() {
  const { email } = useLoaderData<typeof loader>();
  const lastResult = useActionData<typeof action>();
  const [form, fields] = useSchemaForm("reset", schema, lastResult);
  if (!email) {
    return (
      <AuthNote
        title="This link no longer works"
        link={{ to: "/forgot-password", label: "Send a new link" }}
      >
        A reset link works once, for 30 minutes. Ask for a new one.
      </AuthNote>
    );
  }
  return (
    <>
      <h1 className="text-xl font-semibold">Choose a new password</h1>
      <p className="mt-2 text-sm text-neutral-600">
        For {email}. Every signed-in session of this account ends.
      </p>
      <SchemaForm form={form} className="mt-6 space-y-4">
        <Field
          label="New password"
          meta={fields.password}
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters."
        />
        <Field
          label="Repeat it"
          meta={fields.confirm}
          type="password"
          autoComplete="new-password"
        />
        <SubmitButton>Set the password</SubmitButton>
      </SchemaForm>
    </>
  );
}
