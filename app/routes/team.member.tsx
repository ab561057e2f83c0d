import { data, Form, Link, redirect, useActionData, useLoaderData } from "react-router";
import { z } from "zod";
import { CsrfInput } from "~/components/csrf-input";
import { FormError, SubmitButton } from "~/components/form";
import { Card, PageHeader, When } from "~/components/page";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { clientIp } from "~/lib/http/request.server";
import { roleHints, roleLabels, ROLES } from "~/lib/domain/roles";
import { teamData } from "~/lib/data/team-data.server";
import { roleField } from "~/lib/domain/validation";
import type { Route } from "./+types/team.member";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid, NotFound } from "~/lib/domain/errors";

const params = z.object({ memberId: z.coerce.number().int().positive() });
const roleSchema = z.object({ intent: z.literal("change-role"), role: roleField });

export const meta: Route.MetaFunction = ({ data }) => [
  { title: `${data?.member.name ?? "Member"} · Team · Twistlog` },
];

/** /team/members/:memberId — admins only; a member of another team is 404, like no member. */
export const loader = pageRoute(async ({ request, params: raw }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "admin");
  const { memberId } = parseParams(raw);
  return { teamName: team.name, member: await teamData(team.id).member(memberId) };
});

export const action = pageRoute(async ({ request, params: raw, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const { team, user } = await requireAccess(request, "admin");
  const scoped = teamData(team.id);
  const member = await scoped.member(parseParams(raw).memberId);
  const ip = clientIp(context);
  const lastAdmin = member.role === "admin" && (await scoped.adminCount()) === 1;

  if (form.get("intent") === "remove") {
    if (lastAdmin) {
      return data(
        { error: "The team's last admin cannot be removed: make someone else admin first." },
        { status: 400 },
      );
    }
    await scoped.removeMember(member.id);
    await audit({
      teamId: team.id,
      actor: user,
      action: "member-removed",
      detail: member.email,
      ip,
    });
    throw redirect(member.userId === user.id ? "/vehicles" : "/team");
  }

  const parsed = roleSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) throw new Invalid("Choose one of the roles.");
  const role = parsed.data.role;
  if (lastAdmin && role !== "admin") {
    return data(
      { error: "The team's last admin cannot step down: make someone else admin first." },
      { status: 400 },
    );
  }
  if (role !== member.role) {
    await scoped.setRole(member.id, role);
    await audit({
      teamId: team.id,
      actor: user,
      action: "role-changed",
      detail: `${member.email}: ${member.role} → ${role}`,
      ip,
    });
  }
  throw redirect("/team");
});

function parseParams(raw: unknown) {
  const parsed = params.safeParse(raw);
  if (!parsed.success) throw new NotFound("No such member in this team.");
  return parsed.data;
}

export default function Member() {
  const { member, teamName } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  return (
    <div className="max-w-2xl">
      <p className="mb-2 text-sm">
        <Link to="/team" className="text-indigo-700 underline underline-offset-4">
          {teamName}
        </Link>
        <span aria-hidden="true"> › </span>
        {member.name}
      </p>
      <PageHeader
        title={member.name}
        lead={
          <>
            {member.email} · member since <When date={member.joinedAt} />
          </>
        }
      />
      <div className="space-y-6">
        <FormError id="member-error" errors={result?.error ? [result.error] : undefined} />
        <Card title="Role" id="role">
          <Form method="post" className="space-y-3">
            <CsrfInput />
            <fieldset>
              <legend className="sr-only">Role in {teamName}</legend>
              {ROLES.map((r) => (
                <label key={r} className="flex items-start gap-3 py-1.5 text-sm">
                  <input
                    type="radio"
                    name="role"
                    value={r}
                    defaultChecked={r === member.role}
                    className="mt-1 accent-indigo-600"
                  />
                  <span>
                    <span className="font-medium">{roleLabels[r]}</span>
                    <span className="block text-neutral-600">{roleHints[r]}</span>
                  </span>
                </label>
              ))}
            </fieldset>
            <SubmitButton name="intent" value="change-role">
              Save role
            </SubmitButton>
          </Form>
        </Card>
        <Card title="Remove from the team" id="remove">
          <p className="text-sm text-neutral-600">
            {member.name} loses access to {teamName} at once, and their API tokens for it stop
            working. Their account stays; an admin can invite them again.
          </p>
          <Form method="post" className="mt-3">
            <CsrfInput />
            <SubmitButton name="intent" value="remove" tone="danger">
              Remove {member.name}
            </SubmitButton>
          </Form>
        </Card>
      </div>
    </div>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
