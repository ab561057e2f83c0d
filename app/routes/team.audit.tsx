import { useLoaderData } from "react-router";
import { EmptyState, PageHeader, tableClass, tdClass, thClass, When } from "~/components/page";
import { requireTeamRole } from "~/lib/permissions.server";
import type { AuditAction } from "~/lib/audit.server";
import { teamData } from "~/lib/team-data.server";
import type { Route } from "./+types/team.audit";
import { GeneralErrorBoundary } from "~/components/error-boundary";

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
};

/** /team/audit — admins read who did what, when and from where, newest first (last 200). */
export async function loader({ request }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "admin");
  return { teamName: team.name, events: await teamData(team.id).auditLog(200) };
}

export default function AuditLog() {
  const { teamName, events } = useLoaderData<typeof loader>();
  return (
    <main>
      <PageHeader
        title="Audit log"
        lead={`${teamName}: team changes and the sign-ins of its members. The newest 200 entries.`}
      />
      {events.length === 0 ? (
        <EmptyState>Nothing recorded yet.</EmptyState>
      ) : (
        <div className="rounded-lg border border-neutral-200 bg-white px-6 py-2">
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
                <tr key={e.id}>
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
        </div>
      )}
    </main>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
