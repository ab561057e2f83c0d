/**
 * The team page's cards: members, open invitations, the amplitude unit, the trend reference
 * speed, the sign-off approvers and what each role may do.
 */
import type { SubmissionResult } from "@conform-to/react";
import { Form, Link } from "react-router";
import { roleHints, roleLabels, ROLES, type Role } from "~/lib/domain/roles";
import {
  TREND_REFERENCE_DEFAULT_RPM,
  TREND_REFERENCE_MAX_RPM,
  TREND_REFERENCE_MIN_RPM,
  trendReferenceSchema,
} from "~/lib/domain/trend-settings";
import { SIGNOFF_APPROVERS, type SignoffApprovers } from "~/lib/domain/signoff";
import { signoffApproverLabels } from "~/lib/domain/signoff-text";
import { CsrfInput } from "./csrf-input";
import { IntentButton, SchemaForm, SubmitButton, useSchemaForm } from "./form";
import { InputField } from "./form-fields";
import { Card, EmptyState, TableHead, tableClass, tdClass, When } from "./page";
import { ScrollArea } from "./scroll-area";

/** The team's members; admins get a "Manage" link per member. */
export function MembersCard({
  members,
  meId,
  admin,
}: {
  members: {
    id: number;
    userId: number;
    name: string;
    email: string;
    role: Role;
    joinedAt: Date;
  }[];
  /** The signed-in user's id, marked "(you)". */
  meId: number;
  admin: boolean;
}) {
  return (
    <Card title="Members" id="members">
      <ScrollArea label="Members">
        <table className={tableClass}>
          <TableHead
            columns={["Name", "E-mail", "Role", "Joined"]}
            action={admin ? "Manage" : undefined}
          />
          <tbody>
            {members.map((m) => (
              <tr key={m.id}>
                <td className={tdClass}>
                  {m.name}
                  {m.userId === meId ? <span className="ml-1 text-neutral-500">(you)</span> : null}
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
  );
}

export function Invitations({
  invitations,
}: {
  invitations: { id: number; email: string; role: Role; expiresAt: Date }[];
}) {
  return (
    <Card title="Open invitations" id="invitations">
      {invitations.length === 0 ? (
        <EmptyState>No open invitations. Invite a colleague with the form on this page.</EmptyState>
      ) : (
        <ScrollArea label="Open invitations">
          <table className={tableClass}>
            <TableHead columns={["E-mail", "Role", "Link works until"]} action="Withdraw" />
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

export function UnitsCard({ unit, canEdit }: { unit: "rpm" | "rad/s"; canEdit: boolean }) {
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

/** The engine speed at which the vehicle pages' damper-health trend reads the isolation. */
export function TrendReferenceCard({
  rpm,
  canEdit,
  lastResult,
}: {
  rpm: number;
  canEdit: boolean;
  lastResult: SubmissionResult<string[]> | undefined;
}) {
  return (
    <Card title="Trend reference speed" id="trend-reference">
      <p className="text-sm text-neutral-600">
        The damper-health trend on each vehicle page compares the isolation at{" "}
        <strong data-trend-reference-rpm={rpm}>{rpm} rpm</strong> from one drive log to the next
        (the engine-speed bin nearest to it).
      </p>
      {canEdit ? <TrendReferenceForm rpm={rpm} lastResult={lastResult} /> : null}
    </Card>
  );
}

function TrendReferenceForm({
  rpm,
  lastResult,
}: {
  rpm: number;
  lastResult: SubmissionResult<string[]> | undefined;
}) {
  const [form, fields] = useSchemaForm("trend-reference-form", trendReferenceSchema, lastResult, {
    referenceRpm: String(rpm),
  });
  return (
    <SchemaForm form={form} intent="set-trend-reference" className="mt-3 space-y-3">
      <InputField
        label="Reference speed"
        unit="rpm"
        meta={fields.referenceRpm}
        numeric
        hint={`From ${TREND_REFERENCE_MIN_RPM} to ${TREND_REFERENCE_MAX_RPM} rpm; ${TREND_REFERENCE_DEFAULT_RPM} rpm unless the team sets another.`}
      />
      <SubmitButton tone="secondary">Save reference speed</SubmitButton>
    </SchemaForm>
  );
}

/** Who approves sign-offs (issue 16): admins choose; everyone reads it. */
export function SignoffApproversCard({
  approvers,
  canEdit,
  error,
}: {
  approvers: SignoffApprovers;
  canEdit: boolean;
  error: string | undefined;
}) {
  return (
    <Card title="Sign-off approvers" id="signoff-approvers">
      <p className="text-sm text-neutral-600">
        A proposed sign-off is approved or rejected by{" "}
        <strong data-signoff-approvers={approvers}>{signoffApproverLabels[approvers]}</strong>.
        Nobody decides on their own proposal.
      </p>
      {canEdit ? (
        <Form method="post" className="mt-3 space-y-3">
          <CsrfInput />
          <fieldset aria-describedby={error ? "signoff-approvers-error" : undefined}>
            <legend className="text-sm font-medium text-neutral-800">Who approves</legend>
            {SIGNOFF_APPROVERS.map((a) => (
              <label key={a} className="mt-2 flex items-start gap-2 text-sm">
                <input
                  type="radio"
                  name="approvers"
                  value={a}
                  defaultChecked={a === approvers}
                  className="mt-0.5 size-4 accent-indigo-600"
                />
                <span>
                  {a === "engineers"
                    ? "Any engineer or admin other than the proposer"
                    : "Only an admin other than the proposer"}
                </span>
              </label>
            ))}
          </fieldset>
          {error ? (
            <p id="signoff-approvers-error" role="alert" className="text-sm text-red-700">
              {error}
            </p>
          ) : null}
          <SubmitButton name="intent" value="set-signoff-approvers" tone="secondary">
            Save approvers
          </SubmitButton>
        </Form>
      ) : (
        <p className="mt-2 text-xs text-neutral-500">Admins change who approves.</p>
      )}
    </Card>
  );
}

/** What each role may do, for everyone to read. */
export function RolesCard() {
  return (
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
  );
}
