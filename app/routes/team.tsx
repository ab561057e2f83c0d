import { parseWithZod } from "@conform-to/zod/v4";
import { data, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { Field, SelectField, SubmitButton, SchemaForm, useSchemaForm } from "~/components/form";
import { Card, Notice, PageHeader } from "~/components/page";
import {
  Invitations,
  MembersCard,
  RolesCard,
  SignoffApproversCard,
  TrendReferenceCard,
  UnitsCard,
} from "~/components/team-cards";
import { LoggerVocabularyCard } from "~/components/logger-vocabulary-card";
import { ingestSettingsAction } from "~/lib/http/team-ingest.server";
import { trendSettingsAction } from "~/lib/http/team-trend.server";
import { signoffSettingsAction } from "~/lib/http/team-signoff.server";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { inviteToTeam, InvitationProblem } from "~/lib/data/invitations.server";
import { appOrigin, clientIp } from "~/lib/http/request.server";
import { atLeast, roleLabels, ROLES } from "~/lib/domain/roles";
import { teamData } from "~/lib/data/team-data.server";
import { emailField, roleField } from "~/lib/domain/validation";
import type { Route } from "./+types/team";
import { GeneralErrorBoundary } from "~/components/error-boundary";
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
    ingest: await scoped.ingestSettings(),
    invitations: admin ? await scoped.openInvitations() : [],
  };
});

export const action = pageRoute(async ({ request, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const intent = form.get("intent");
  const ip = clientIp(context);
  const ingest = await ingestSettingsAction(request, form, ip);
  if (ingest) return ingest;
  const trend = await trendSettingsAction(request, form, ip);
  if (trend) return trend;
  const approvers = await signoffSettingsAction(request, form, ip);
  if (approvers) return approvers;

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
  const { me, team, members, invitations, ingest } = useLoaderData<typeof loader>();
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
          <MembersCard members={members} meId={me.userId} admin={admin} />
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
          <TrendReferenceCard
            rpm={team.trendReferenceRpm}
            canEdit={atLeast(me.role, "engineer")}
            lastResult={result && "trendReference" in result ? result.trendReference : undefined}
          />
          <SignoffApproversCard
            approvers={team.signoffApprovers}
            canEdit={admin}
            error={result && "approversError" in result ? result.approversError : undefined}
          />
          <LoggerVocabularyCard
            settings={ingest}
            canEdit={atLeast(me.role, "engineer")}
            lastResult={result && "channelName" in result ? result.channelName : undefined}
          />
          <RolesCard />
        </div>
      </div>
    </div>
  );
}

function InviteForm({ lastResult }: { lastResult: Parameters<typeof useSchemaForm>[2] }) {
  const [form, fields] = useSchemaForm("invite", inviteSchema, lastResult, { role: "engineer" });
  return (
    <Card title="Invite a colleague" id="invite">
      <SchemaForm form={form} intent="invite" className="space-y-4">
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
      </SchemaForm>
    </Card>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
