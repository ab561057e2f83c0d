import type { ReactNode } from "react";
import { data, Form, Link, useLoaderData } from "react-router";
import { z } from "zod";
import { inputClass, linkClass } from "~/components/form-fields";
import { EmptyState, PageHeader, tableClass, tdClass, thClass, When } from "~/components/page";
import { ScrollArea } from "~/components/scroll-area";
import type { AuditAction } from "~/lib/data/audit.server";
import { teamData } from "~/lib/data/team-data.server";
import type { Route } from "./+types/team.audit";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

export const meta = () => [{ title: "Audit log · Twistlog" }];

const actionLabels: Record<AuditAction, string> = {
  "sign-in": "Signed in",
  "sign-in-failed": "Failed sign-in",
  "sign-in-throttled": "Sign-in refused (too many failures)",
  "sign-out": "Signed out",
  "session-revoked": "Ended a session",
  "password-reset-requested": "Asked for a password reset",
  "password-reset": "Reset the password",
  "invitation-sent": "Sent an invitation",
  "invitation-revoked": "Withdrew an invitation",
  "invitation-accepted": "Accepted an invitation",
  "role-changed": "Changed a role",
  "member-removed": "Removed a member",
  "team-settings-changed": "Changed a team setting",
  "token-created": "Created an API token",
  "token-revoked": "Revoked an API token",
  "vehicle-created": "Added a vehicle",
  "vehicle-changed": "Changed a vehicle",
  "vehicle-archived": "Archived a vehicle",
  "vehicle-restored": "Restored a vehicle",
  "target-created": "Set a target",
  "target-changed": "Changed a target",
  "target-deleted": "Deleted a target",
  "share-created": "Created a share link",
  "share-extended": "Extended a share link",
  "share-revoked": "Revoked a share link",
  "share-emailed": "Sent a share link by e-mail",
  "drive-log-deleted": "Deleted a drive log",
  "vehicle-reanalysed": "Re-analysed a vehicle's drive logs",
  "signoff-proposed": "Proposed a sign-off",
  "signoff-approved": "Approved a sign-off",
  "signoff-rejected": "Rejected a sign-off",
  "signoff-withdrawn": "Withdrew a sign-off",
  "signoff-superseded": "Superseded a sign-off",
};
const ACTIONS = Object.keys(actionLabels) as [AuditAction, ...AuditAction[]];

const LIMIT = 200;
const dateParam = z.iso.date({ error: "Use a date like 2026-11-04." });
/** The filters are GET parameters, so a filtered view can be bookmarked and shared among admins. */
const filterSchema = z
  .object({
    action: z.enum(ACTIONS, { error: "Choose an action from the list." }).optional(),
    person: z.string().trim().max(254, "That is longer than any e-mail address.").optional(),
    from: dateParam.optional(),
    to: dateParam.optional(),
  })
  .refine((f) => !f.from || !f.to || f.from <= f.to, {
    path: ["to"],
    message: "The end date is before the start date.",
  });
type FilterErrors = Partial<Record<"action" | "person" | "from" | "to", string>>;

const DAY_MS = 86_400_000;

/** /team/audit — admins read who did what, when and from where, newest first (last 200). */
export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "admin");
  const scoped = teamData(team.id);
  // An empty field of the form means "any".
  const raw = Object.fromEntries(
    [...new URL(request.url).searchParams].filter(([, v]) => v.trim() !== ""),
  );
  const parsed = filterSchema.safeParse(raw);
  const found = await scoped.auditChoices();
  const shown = {
    action: raw.action ?? "",
    person: raw.person ?? "",
    from: raw.from ?? "",
    to: raw.to ?? "",
  };
  // The filters offer what the log holds, and whatever a bookmark names (so it stays visible).
  const actions = ACTIONS.filter((a) => a === shown.action || found.actions.includes(a));
  const people =
    shown.person && !found.people.includes(shown.person)
      ? [shown.person, ...found.people]
      : found.people;
  const filtered = Object.values(shown).some((v) => v !== "");
  if (!parsed.success) {
    const errors: FilterErrors = {};
    for (const issue of parsed.error.issues)
      errors[issue.path[0] as keyof FilterErrors] ??= issue.message;
    return data(
      { teamName: team.name, events: null, actions, people, shown, filtered, errors },
      { status: 400 },
    );
  }
  const f = parsed.data;
  const events = await scoped.auditLog(LIMIT, {
    action: f.action,
    actorEmail: f.person,
    // The dates are days in UTC, as the log shows its times; "to" includes its whole day.
    from: f.from ? new Date(`${f.from}T00:00:00Z`) : undefined,
    before: f.to ? new Date(Date.parse(`${f.to}T00:00:00Z`) + DAY_MS) : undefined,
  });
  return {
    teamName: team.name,
    events,
    actions,
    people,
    shown,
    filtered,
    errors: {} as FilterErrors,
  };
});

export default function AuditLog() {
  const { teamName, events, actions, people, shown, filtered, errors } =
    useLoaderData<typeof loader>();
  return (
    <div>
      <PageHeader
        title="Audit log"
        lead={`${teamName}: team changes and the sign-ins of its members. The newest ${LIMIT} entries that match the filters.`}
      />
      <AuditFilters
        actions={actions}
        people={people}
        shown={shown}
        errors={errors}
        filtered={filtered}
      />
      {events === null ? (
        <EmptyState>Correct the filters above to see the entries.</EmptyState>
      ) : events.length === 0 ? (
        filtered ? (
          <EmptyState>
            No entries match these filters.{" "}
            <Link to="/team/audit" className={linkClass}>
              Clear the filters
            </Link>
          </EmptyState>
        ) : (
          <EmptyState>Nothing recorded yet.</EmptyState>
        )
      ) : (
        <div className="rounded-lg border border-neutral-200 bg-white px-4 py-2 sm:px-6">
          <ScrollArea label="Audit log entries">
            <table className={tableClass}>
              <thead>
                <tr>
                  <th className={thClass}>When</th>
                  <th className={thClass}>Who</th>
                  <th className={thClass}>What</th>
                  <th className={thClass}>Details</th>
                  <th className={thClass}>From</th>
                </tr>
              </thead>
              <tbody>
                {events.map((e) => (
                  <tr key={e.id} data-audit-action={e.action}>
                    <td className={`${tdClass} whitespace-nowrap`}>
                      <When date={e.createdAt} />
                    </td>
                    <td className={tdClass}>{e.actorEmail}</td>
                    <td className={tdClass}>{actionLabels[e.action as AuditAction] ?? e.action}</td>
                    <td className={`${tdClass} text-neutral-600`}>{e.detail}</td>
                    <td className={`${tdClass} font-mono text-xs`}>{e.ip}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </ScrollArea>
        </div>
      )}
    </div>
  );
}

/** A plain GET form: works without JavaScript, and its URL is the bookmark. */
function AuditFilters({
  actions,
  people,
  shown,
  errors,
  filtered,
}: {
  actions: AuditAction[];
  people: string[];
  shown: Record<"action" | "person" | "from" | "to", string>;
  errors: FilterErrors;
  filtered: boolean;
}) {
  // One labelled control per filter, its error tied to it for screen readers.
  const field = (
    name: keyof FilterErrors,
    title: string,
    control: (props: {
      id: string;
      name: string;
      defaultValue: string;
      className: string;
      "aria-invalid"?: true;
      "aria-describedby"?: string;
    }) => ReactNode,
  ) => (
    <div>
      <label htmlFor={`audit-${name}`} className="block text-xs font-medium text-neutral-700">
        {title}
      </label>
      {control({
        id: `audit-${name}`,
        name,
        defaultValue: shown[name],
        className: `mt-1 ${inputClass} py-1.5`,
        ...(errors[name]
          ? { "aria-invalid": true, "aria-describedby": `audit-${name}-error` }
          : {}),
      })}
      {errors[name] ? (
        <p id={`audit-${name}-error`} className="mt-1 text-sm text-red-700">
          {errors[name]}
        </p>
      ) : null}
    </div>
  );
  return (
    <Form
      // A new key per loaded filter set: "Clear filters" and back/forward reset the fields.
      key={Object.values(shown).join("|")}
      method="get"
      role="search"
      aria-label="Filter the audit log"
      className="mb-6 grid gap-3 sm:grid-cols-2 lg:grid-cols-[2fr_2fr_1fr_1fr_auto]"
    >
      {field("action", "Action", (props) => (
        <select {...props}>
          <option value="">Any action</option>
          {actions.map((a) => (
            <option key={a} value={a}>
              {actionLabels[a]}
            </option>
          ))}
        </select>
      ))}
      {field("person", "Person", (props) => (
        <select {...props}>
          <option value="">Anyone</option>
          {people.map((p) => (
            <option key={p} value={p}>
              {p}
            </option>
          ))}
        </select>
      ))}
      {field("from", "From date (UTC)", (props) => (
        <input type="date" {...props} />
      ))}
      {field("to", "To date (UTC)", (props) => (
        <input type="date" {...props} />
      ))}
      <div className="flex flex-wrap items-end gap-3">
        <button
          type="submit"
          className="rounded-md border border-neutral-300 bg-white px-3 py-1.5 text-sm font-medium hover:bg-neutral-50"
        >
          Apply filters
        </button>
        {filtered ? (
          <Link to="/team/audit" className={`${linkClass} py-1.5 text-sm`}>
            Clear filters
          </Link>
        ) : null}
      </div>
    </Form>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
