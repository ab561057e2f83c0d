import { parseWithZod } from "@conform-to/zod/v4";
import { data, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { Field, SubmitButton, SchemaForm, useSchemaForm } from "~/components/form";
import { AuthLink } from "~/components/auth-note";
import { authenticateWithPassword, SignInRefused } from "~/lib/http/auth.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { clientIp, safeRedirect } from "~/lib/http/request.server";
import { startSession } from "~/lib/http/session.server";
import { emailField, passwordField } from "~/lib/domain/validation";
import type { Route } from "./+types/sign-in";
import { getCurrentUser } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

const schema = z.object({
  email: emailField,
  password: passwordField.min(1, "Enter your password."),
  redirectTo: z.string().max(500).optional(),
});

export const meta = () => [{ title: "Sign in · Twistlog" }];

export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const url = new URL(request.url);
  const redirectTo = safeRedirect(url.searchParams.get("redirectTo"));
  if (await getCurrentUser(request)) throw redirect(redirectTo);
  return { redirectTo, notice: url.searchParams.get("notice") };
});

export const action = pageRoute(async ({ request, context }: Route.ActionArgs) => {
  // remix-auth's FormStrategy reads the body itself: read a clone here (docs/stack-notes.md).
  const form = await readForm(request.clone());
  await assertCsrf(request, form);
  const submission = parseWithZod(form, { schema });
  if (submission.status !== "success") {
    return data(submission.reply({ hideFields: ["password"] }), { status: 400 });
  }
  const ip = clientIp(context);
  try {
    const user = await authenticateWithPassword(request, ip);
    const setCookie = await startSession(request, user.id, null, ip);
    throw redirect(safeRedirect(submission.value.redirectTo), {
      headers: { "Set-Cookie": setCookie },
    });
  } catch (error) {
    if (!(error instanceof SignInRefused)) throw error;
    return data(submission.reply({ formErrors: [error.message], hideFields: ["password"] }), {
      status: error.reason === "throttled" ? 429 : 400,
    });
  }
});

const notices: Record<string, string> = {
  "signed-out": "You are signed out.",
  "password-changed":
    "Your password is changed and every session has ended. Sign in with the new one.",
};

export default function SignIn() {
  const { redirectTo, notice } = useLoaderData<typeof loader>();
  const lastResult = useActionData<typeof action>();
  const [form, fields] = useSchemaForm("sign-in", schema, lastResult);
  const noticeText = notice ? notices[notice] : undefined;
  return (
    <>
      <h1 className="text-xl font-semibold">Sign in</h1>
      {noticeText ? (
        <p role="status" className="mt-4 rounded-md bg-indigo-50 px-3 py-2 text-sm text-indigo-900">
          {noticeText}
        </p>
      ) : null}
      <SchemaForm
        form={form}
        hidden={<input type="hidden" name="redirectTo" value={redirectTo} />}
        className="mt-6 space-y-4"
      >
        <Field label="E-mail address" meta={fields.email} type="email" autoComplete="username" />
        <Field
          label="Password"
          meta={fields.password}
          type="password"
          autoComplete="current-password"
        />
        <SubmitButton>Sign in</SubmitButton>
      </SchemaForm>
      <AuthLink to="/forgot-password">Forgot your password?</AuthLink>
    </>
  );
}
