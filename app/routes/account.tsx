import { Form, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { CsrfInput } from "~/components/csrf-input";
import { IntentButton, SubmitButton } from "~/components/form";
import { Card, Notice, PageHeader, TableHead, tableClass, tdClass, When } from "~/components/page";
import { ScrollArea } from "~/components/scroll-area";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { clientIp } from "~/lib/http/request.server";
import { roleLabels } from "~/lib/domain/roles";
import { listSessions, revokeAllSessions, revokeSession } from "~/lib/http/session.server";
import type { Route } from "./+types/account";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { requireUser } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid, NotFound } from "~/lib/domain/errors";

const revokeSchema = z.object({
  intent: z.literal("revoke"),
  sessionId: z.string().regex(/^[0-9a-f]{64}$/),
});

export const meta = () => [{ title: "Account · Twistlog" }];

export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const { user, sessionId, teams } = await requireUser(request);
  const sessions = await listSessions(user.id);
  return { user, teams, sessions: sessions.map((s) => ({ ...s, current: s.id === sessionId })) };
});

export const action = pageRoute(async ({ request, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const { user, sessionId } = await requireUser(request);
  const ip = clientIp(context);
  if (form.get("intent") === "revoke-others") {
    await revokeAllSessions(user.id, sessionId);
    await audit({
      teamId: null,
      actor: user,
      action: "session-revoked",
      detail: "all other sessions",
      ip,
    });
    return { notice: "Every other session has ended." };
  }
  const parsed = revokeSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) throw new Invalid("No session was chosen.");
  if (!(await revokeSession(user.id, parsed.data.sessionId)))
    throw new NotFound("No such session.");
  await audit({ teamId: null, actor: user, action: "session-revoked", ip });
  if (parsed.data.sessionId === sessionId) throw redirect("/sign-in?notice=signed-out");
  return { notice: "The session has ended." };
});

export default function Account() {
  const { user, teams, sessions } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  return (
    <div className="max-w-4xl space-y-6">
      <PageHeader title="Your account" lead={`${user.name} · ${user.email}`} />
      {result?.notice ? <Notice>{result.notice}</Notice> : null}
      <Card title="Teams" id="teams">
        <ul className="space-y-1 text-sm">
          {teams.map((t) => (
            <li key={t.id}>
              {t.name} <span className="text-neutral-500">· {roleLabels[t.role]}</span>
            </li>
          ))}
          {teams.length === 0 ? (
            <li className="text-neutral-600">You are in no team yet. An admin can invite you.</li>
          ) : null}
        </ul>
      </Card>
      <Card title="Signed-in sessions" id="sessions">
        <p className="mb-4 text-sm text-neutral-600">
          Each browser you signed in with. End any you do not recognise; a password reset ends them
          all.
        </p>
        <ScrollArea label="Signed-in sessions">
          <table className={tableClass}>
            <TableHead columns={["Browser", "Address", "Signed in"]} action="End" />
            <tbody>
              {sessions.map((s) => (
                <tr key={s.id}>
                  <td className={`${tdClass} max-w-40 truncate sm:max-w-sm`} title={s.userAgent}>
                    {s.userAgent || "unknown browser"}
                    {s.current ? (
                      <span className="ml-2 rounded bg-indigo-50 px-1.5 py-0.5 text-xs font-medium text-indigo-800">
                        this one
                      </span>
                    ) : null}
                  </td>
                  <td className={tdClass}>{s.ip}</td>
                  <td className={tdClass}>
                    <When date={s.createdAt} />
                  </td>
                  <td className={`${tdClass} text-right`}>
                    <IntentButton intent="revoke" fields={{ sessionId: s.id }} tone="secondary">
                      {s.current ? "Sign out here" : "End"}
                    </IntentButton>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollArea>
        {sessions.length > 1 ? (
          <Form method="post" className="mt-4">
            <CsrfInput />
            <SubmitButton name="intent" value="revoke-others" tone="danger">
              End every other session
            </SubmitButton>
          </Form>
        ) : null}
      </Card>
    </div>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
