import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, Link, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { CsrfInput } from "~/components/csrf-input";
import {
  Field,
  FormError,
  IntentButton,
  SelectField,
  SubmitButton,
  useSchemaForm,
} from "~/components/form";
import {
  Card,
  EmptyState,
  Notice,
  PageHeader,
  tableClass,
  tdClass,
  thClass,
  When,
} from "~/components/page";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { inviteToTeam, InvitationProblem } from "~/lib/data/invitations.server";
import { appOrigin, clientIp } from "~/lib/http/request.server";
import { atLeast, roleHints, roleLabels, ROLES } from "~/lib/domain/roles";
import { teamData } from "~/lib/data/team-data.server";
import { emailField, roleField } from "~/lib/domain/validation";
import type { Route } from "./+types/team";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { ScrollArea } from "~/components/scroll-area";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid } from "~/lib/domain/errors";

const inviteSchema = z.object({ intent: z.literal("invite"), email: emailField, role: roleField });
const unitSchema = z.object({ intent: z.literal("set-units"), unit: z.enum(["rpm", "rad/s"]) });
const revokeSchema = z.object({
  intent: z.literal("revoke-invitation"),
  invitationId: z.coerce.number().int().positive(),
});

export const meta = () => [{ title: "Team · Twistlog" }];

export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const { team, user } = await requireAccess(request, "viewer");
  const scoped = teamData(team.id);
  const admin = atLeast(team.role, "admin");
  return {
    me: { userId: user.id, role: team.role },
    team: await scoped.team(),
    members: await scoped.members(),
    invitations: admin ? await scoped.openInvitations() : [],
  };
});

export const action = pageRoute(async ({ request, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const intent = form.get("intent");
  const ip = clientIp(context);

  if (intent === "set-units") {
    // Display settings belong to the people who analyse: engineers and admins.
    const { team, user } = await requireAccess(request, "engineer");
    const parsed = unitSchema.safeParse(Object.fromEntries(form));
    if (!parsed.success) throw new Invalid("Choose rpm or rad/s.");
    await teamData(team.id).setAmplitudeUnit(parsed.data.unit);
    await audit({
      teamId: team.id,
      actor: user,
      action: "team-settings-changed",
      detail: `amplitudes in ${parsed.data.unit}`,
      ip,
    });
    return { notice: `Amplitudes are now shown in ${parsed.data.unit}.` };
  }

  const { team, user } = await requireAccess(request, "admin");
  if (intent === "revoke-invitation") {
    const parsed = revokeSchema.safeParse(Object.fromEntries(form));
    if (!parsed.success) throw new Invalid("No invitation was chosen.");
    await teamData(team.id).revokeInvitation(parsed.data.invitationId);
    await audit({
      teamId: team.id,
      actor: user,
      action: "invitation-revoked",
      detail: `invitation ${parsed.data.invitationId}`,
      ip,
    });
    return { notice: "The invitation is withdrawn; its link no longer works." };
  }

  if (intent !== "invite") throw new Invalid("Unknown action.");
  const submission = parseWithZod(form, { schema: inviteSchema });
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { email, role } = submission.value;
  try {
    await inviteToTeam({
      teamId: team.id,
      teamName: team.name,
      email,
      role,
      invitedBy: user,
      origin: appOrigin(request),
    });
  } catch (error) {
    if (!(error instanceof InvitationProblem)) throw error;
    return data(submission.reply({ formErrors: [error.message] }), { status: 400 });
  }
  await audit({
    teamId: team.id,
    actor: user,
    action: "invitation-sent",
    detail: `${email} as ${role}`,
    ip,
  });
  return { ...submission.reply({ resetForm: true }), notice: `Invitation sent to ${email}.` };
});

export default function Team() {
  const { me, team, members, invitations } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const admin = atLeast(me.role, "admin");
  return (
    <div>
      <PageHeader
        title={team.name}
        lead={`${members.length} ${members.length === 1 ? "member" : "members"}. You are ${roleLabels[me.role]} in this team.`}
      />
      {result && "notice" in result && result.notice ? <Notice>{result.notice}</Notice> : null}
      {/* min-w-0: a wide table scrolls in its box instead of widening the column and the page. */}
      <div className="grid gap-6 lg:grid-cols-[2fr_1fr]">
        <div className="min-w-0 space-y-6">
          <Card title="Members" id="members">
            <ScrollArea label="Members">
              <table className={tableClass}>
                <thead>
                  <tr>
                    <th className={thClass}>Name</th>
                    <th className={thClass}>E-mail</th>
                    <th className={thClass}>Role</th>
                    <th className={thClass}>Joined</th>
                    {admin ? (
                      <th className={thClass}>
                        <span className="sr-only">Manage</span>
                      </th>
                    ) : null}
                  </tr>
                </thead>
                <tbody>
                  {members.map((m) => (
                    <tr key={m.id}>
                      <td className={tdClass}>
                        {m.name}
                        {m.userId === me.userId ? (
                          <span className="ml-1 text-neutral-500">(you)</span>
                        ) : null}
                      </td>
                      <td className={tdClass}>{m.email}</td>
                      <td className={tdClass}>{roleLabels[m.role]}</td>
                      <td className={`${tdClass} whitespace-nowrap`}>
                        <When date={m.joinedAt} dateOnly />
                      </td>
                      {admin ? (
                        <td className={`${tdClass} text-right`}>
                          <Link
                            to={`/team/members/${m.id}`}
                            className="text-indigo-700 underline underline-offset-4"
                          >
                            Manage<span className="sr-only"> {m.name}</span>
                          </Link>
                        </td>
                      ) : null}
                    </tr>
                  ))}
                </tbody>
              </table>
            </ScrollArea>
          </Card>
          {admin ? <Invitations invitations={invitations} /> : null}
        </div>
        <div className="min-w-0 space-y-6">
          {admin ? (
            // A new key after each invitation empties the form for the next one.
            <InviteForm
              key={result && "notice" in result ? result.notice : "invite"}
              lastResult={result && "status" in result ? result : undefined}
            />
          ) : null}
          <UnitsCard unit={team.amplitudeUnit} canEdit={atLeast(me.role, "engineer")} />
          <Card title="Roles">
            <dl className="space-y-2 text-sm">
              {ROLES.map((r) => (
                <div key={r}>
                  <dt className="font-medium">{roleLabels[r]}</dt>
                  <dd className="text-neutral-600">{roleHints[r]}</dd>
                </div>
              ))}
            </dl>
          </Card>
        </div>
      </div>
    </div>
  );
}

function Invitations({
  invitations,
}: {
  invitations: { id: number; email: string; role: keyof typeof roleLabels; expiresAt: Date }[];
}) {
  return (
    <Card title="Open invitations" id="invitations">
      {invitations.length === 0 ? (
        <EmptyState>No open invitations. Invite a colleague with the form on this page.</EmptyState>
      ) : (
        <ScrollArea label="Open invitations">
          <table className={tableClass}>
            <thead>
              <tr>
                <th className={thClass}>E-mail</th>
                <th className={thClass}>Role</th>
                <th className={thClass}>Link works until</th>
                <th className={thClass}>
                  <span className="sr-only">Withdraw</span>
                </th>
              </tr>
            </thead>
            <tbody>
              {invitations.map((i) => (
                <tr key={i.id}>
                  <td className={tdClass}>{i.email}</td>
                  <td className={tdClass}>{roleLabels[i.role]}</td>
                  <td className={tdClass}>
                    <When date={i.expiresAt} />
                  </td>
                  <td className={`${tdClass} text-right`}>
                    <IntentButton
                      intent="revoke-invitation"
                      fields={{ invitationId: i.id }}
                      tone="danger"
                    >
                      Withdraw<span className="sr-only"> the invitation for {i.email}</span>
                    </IntentButton>
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollArea>
      )}
    </Card>
  );
}

function InviteForm({ lastResult }: { lastResult: Parameters<typeof useSchemaForm>[2] }) {
  const [form, fields] = useSchemaForm("invite", inviteSchema, lastResult, { role: "engineer" });
  return (
    <Card title="Invite a colleague" id="invite">
      <Form method="post" id={form.id} onSubmit={form.onSubmit} noValidate className="space-y-4">
        <CsrfInput />
        <input type="hidden" name="intent" value="invite" />
        <FormError id={form.errorId} errors={form.errors} />
        <Field
          label="E-mail address"
          meta={fields.email}
          type="email"
          hint="They get a link that works once, for 7 days."
        />
        <SelectField
          label="Role"
          meta={fields.role}
          options={ROLES.map((r) => ({ value: r, label: roleLabels[r] }))}
        />
        <SubmitButton>Send invitation</SubmitButton>
      </Form>
    </Card>
  );
}

function UnitsCard({ unit, canEdit }: { unit: "rpm" | "rad/s"; canEdit: boolean }) {
  return (
    <Card title="Amplitude unit" id="units">
      <p className="text-sm text-neutral-600">
        Angular-velocity amplitudes are shown in <strong>{unit}</strong> for everyone in the team.
      </p>
      {canEdit ? (
        <Form method="post" className="mt-3 flex gap-2">
          <CsrfInput />
          <input type="hidden" name="unit" value={unit === "rpm" ? "rad/s" : "rpm"} />
          <SubmitButton name="intent" value="set-units" tone="secondary">
            Show in {unit === "rpm" ? "rad/s" : "rpm"}
          </SubmitButton>
        </Form>
      ) : null}
    </Card>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
