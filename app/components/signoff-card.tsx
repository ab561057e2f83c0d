import { Link } from "react-router";
import { countText } from "~/lib/base/plural";
import { mayDecide, mayPropose, type SignoffApprovers } from "~/lib/domain/signoff";
import type { Role } from "~/lib/domain/roles";
import type { VariantSignoff } from "~/lib/data/signoffs.server";
import { linkClass } from "./form-fields";
import { Card, EmptyState, When } from "./page";
import { SignoffStateBadge } from "./signoff-state";

/**
 * The vehicle page's "Sign-off" card (issue 16): one line per damper variant with the state of
 * its newest sign-off, who and when, and what the viewer can do next: propose (engineers and
 * admins), decide on a waiting proposal (whoever the team's setting allows, never the proposer),
 * or read the draft evidence report of the current state.
 */
export function SignoffCard({
  vehicleId,
  variants,
  approvers,
  me,
}: {
  vehicleId: number;
  variants: VariantSignoff[];
  approvers: SignoffApprovers;
  me: { userId: number; role: Role };
}) {
  const withLogs = variants.filter((v) => v.logs > 0 || v.latest);
  return (
    <Card title="Sign-off" id="signoff">
      <p className="mb-4 max-w-3xl text-sm text-neutral-600">
        A damper variant is released when an engineer claims the targets it meets, names the drive
        logs that prove them, and a second person approves. The approved evidence is frozen.
      </p>
      {withLogs.length === 0 ? (
        <EmptyState>
          No analysed drive logs yet. A sign-off rests on finished drive logs of one damper variant:
          upload some, and propose once their analyses are done.
        </EmptyState>
      ) : (
        <ul className="divide-y divide-neutral-100" data-testid="signoff-variants">
          {withLogs.map((v) => (
            <VariantLine
              key={v.damperVariant}
              vehicleId={vehicleId}
              line={v}
              approvers={approvers}
              me={me}
            />
          ))}
        </ul>
      )}
    </Card>
  );
}

function VariantLine({
  vehicleId,
  line,
  approvers,
  me,
}: {
  vehicleId: number;
  line: VariantSignoff;
  approvers: SignoffApprovers;
  me: { userId: number; role: Role };
}) {
  const { latest, approved } = line;
  const variantQuery = `damperVariant=${encodeURIComponent(line.damperVariant)}`;
  const href = (id: number) => `/vehicles/${vehicleId}/signoffs/${id}`;
  const waiting =
    latest?.state === "proposed" &&
    mayDecide({ approvers, caller: me, proposedBy: latest.proposedBy.id }) === null;
  return (
    <li
      className="flex flex-wrap items-start gap-x-6 gap-y-2 py-3"
      data-variant={line.damperVariant}
    >
      <div className="min-w-40">
        <p className="font-medium">Variant {line.damperVariant}</p>
        <p className="text-xs text-neutral-500">{countText(line.logs, "analysed drive log")}</p>
      </div>
      <div className="min-w-0 flex-1 text-sm">
        {latest ? (
          <>
            <p>
              <SignoffStateBadge state={latest.state} />{" "}
              <Link to={href(latest.id)} className={linkClass}>
                Sign-off {latest.id}
              </Link>
            </p>
            <p className="mt-1 text-xs text-neutral-600">
              {latest.decidedBy && latest.decidedAt ? (
                <>
                  {latest.state === "rejected" ? "Rejected" : "Decided"} by {latest.decidedBy.name}{" "}
                  on <When date={latest.decidedAt} />;{" "}
                </>
              ) : null}
              proposed by {latest.proposedBy.name} on <When date={latest.proposedAt} />
            </p>
            {latest.closedReason &&
            (latest.state === "superseded" || latest.state === "withdrawn") ? (
              <p className="mt-1 text-xs text-amber-900">{latest.closedReason}</p>
            ) : null}
            {approved && approved.id !== latest.id ? (
              <p className="mt-1 text-xs text-neutral-600">
                Last approved:{" "}
                <Link to={href(approved.id)} className={linkClass}>
                  sign-off {approved.id}
                </Link>{" "}
                (<When date={approved.decidedAt} dateOnly />)
              </p>
            ) : null}
            {waiting ? (
              <p className="mt-1 font-medium text-indigo-800" data-decide>
                Waiting for a decision you may take:{" "}
                <Link to={href(latest.id)} className={linkClass}>
                  Approve or reject
                </Link>
              </p>
            ) : null}
          </>
        ) : (
          <p className="text-neutral-600">No sign-off yet.</p>
        )}
      </div>
      <div className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm">
        {mayPropose(me.role) && line.logs > 0 ? (
          <Link to={`/vehicles/${vehicleId}/signoffs/new?${variantQuery}`} className={linkClass}>
            Propose sign-off<span className="sr-only"> of variant {line.damperVariant}</span>
          </Link>
        ) : null}
        {line.logs > 0 ? (
          <a
            href={`/api/v1/vehicles/${vehicleId}/report.pdf?${variantQuery}`}
            className={linkClass}
            download
          >
            Draft report (PDF)<span className="sr-only"> of variant {line.damperVariant}</span>
          </a>
        ) : null}
      </div>
    </li>
  );
}
