import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { CsrfInput } from "~/components/csrf-input";
import { Field, FormError, SelectField, SubmitButton, useSchemaForm } from "~/components/form";
import { Card, EmptyState, Notice, PageHeader } from "~/components/page";
import { NewToken, TokenTable } from "~/components/token-table";
import {
  createApiToken,
  listApiTokens,
  listTeamApiTokens,
  revokeApiToken,
} from "~/lib/data/api-tokens.server";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { clientIp } from "~/lib/http/request.server";
import { atLeast } from "~/lib/domain/roles";
import type { Route } from "./+types/account.tokens";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { requireAccess, requireUser } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid, NotFound } from "~/lib/domain/errors";

const expiryChoices = [
  { value: "30", label: "30 days" },
  { value: "90", label: "90 days" },
  { value: "365", label: "1 year" },
  { value: "never", label: "Never" },
];
const createSchema = z.object({
  intent: z.literal("create"),
  name: z
    .string({ error: "Name the token, e.g. after the script that uses it." })
    .trim()
    .min(1, "Name the token.")
    .max(80, "A token name has at most 80 characters."),
  expires: z.enum(["30", "90", "365", "never"], { error: "Choose when the token expires." }),
});
const revokeSchema = z.object({
  intent: z.enum(["revoke", "revoke-other"]),
  tokenId: z.coerce.number().int().positive(),
});

export const meta = () => [{ title: "API tokens · Twistlog" }];

export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const { user, team } = await requireUser(request);
  const admin = team && atLeast(team.role, "admin");
  return {
    team,
    tokens: await listApiTokens(user.id),
    teamTokens: admin ? await listTeamApiTokens(team.id, user.id) : [],
  };
});

export const action = pageRoute(async ({ request, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const ip = clientIp(context);
  if (form.get("intent") === "create") {
    // A token acts with its owner's role in the team chosen now, so any member may make one.
    const { user, team } = await requireAccess(request, "viewer");
    const submission = parseWithZod(form, { schema: createSchema });
    if (submission.status !== "success") return data(submission.reply(), { status: 400 });
    const { name, expires } = submission.value;
    const expiresAt =
      expires === "never" ? null : new Date(Date.now() + Number(expires) * 86_400_000);
    const { token } = await createApiToken({ userId: user.id, teamId: team.id, name, expiresAt });
    await audit({ teamId: team.id, actor: user, action: "token-created", detail: name, ip });
    return {
      ...submission.reply({ resetForm: true }),
      created: { name, token, teamName: team.name },
    };
  }
  const parsed = revokeSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) throw new Invalid("No token was chosen.");
  const { intent, tokenId } = parsed.data;
  const current =
    intent === "revoke-other" ? await requireAccess(request, "admin") : await requireUser(request);
  const revoked = await revokeApiToken(
    current.user.id,
    tokenId,
    intent === "revoke-other" ? current.team!.id : undefined,
  );
  if (!revoked) throw new NotFound("No such token.");
  await audit({
    teamId: revoked.teamId,
    actor: current.user,
    action: "token-revoked",
    detail: revoked.name,
    ip,
  });
  return { notice: `The token “${revoked.name}” is revoked; requests with it now get 401.` };
});

export default function Tokens() {
  const { team, tokens, teamTokens } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const created = result && "created" in result ? result.created : null;
  const [form, fields] = useSchemaForm(
    "new-token",
    createSchema,
    result && "status" in result ? result : undefined,
    { expires: "90" },
  );
  return (
    <div className="max-w-4xl space-y-6">
      <PageHeader
        title="API tokens"
        lead={
          <>
            For scripts that talk to <code className="rounded bg-neutral-100 px-1">/api/v1/</code>.
            A token acts with your role in its team; treat it like a password.
          </>
        }
      />
      {result && "notice" in result ? <Notice>{result.notice}</Notice> : null}
      {created ? <NewToken created={created} /> : null}
      {team ? (
        <Card title={`New token for ${team.name}`} id="create">
          <Form
            key={created?.token ?? "new"}
            method="post"
            id={form.id}
            onSubmit={form.onSubmit}
            noValidate
            className="grid gap-4 sm:grid-cols-[2fr_1fr_auto] sm:items-start"
          >
            <CsrfInput />
            <input type="hidden" name="intent" value="create" />
            <div className="sm:col-span-3">
              <FormError id={form.errorId} errors={form.errors} />
            </div>
            <Field
              label="Name"
              meta={fields.name}
              hint="What uses it, e.g. “proving-ground upload script”."
            />
            <SelectField label="Expires after" meta={fields.expires} options={expiryChoices} />
            <div className="sm:pt-6">
              <SubmitButton>Create token</SubmitButton>
            </div>
          </Form>
        </Card>
      ) : null}
      <Card title="Your tokens" id="tokens">
        {tokens.length === 0 ? (
          <EmptyState>
            No tokens yet. Create one above, then send it as <code>Authorization: Bearer …</code>.
          </EmptyState>
        ) : (
          <TokenTable
            rows={tokens.map((t) => ({ ...t, who: t.teamName }))}
            whoLabel="Team"
            label="Your tokens"
            intent="revoke"
          />
        )}
      </Card>
      {teamTokens.length > 0 ? (
        <Card title="Other members' tokens in this team" id="team-tokens">
          <TokenTable
            rows={teamTokens.map((t) => ({ ...t, who: t.ownerEmail }))}
            whoLabel="Owner"
            label="Other members' tokens"
            intent="revoke-other"
          />
        </Card>
      ) : null}
    </div>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
