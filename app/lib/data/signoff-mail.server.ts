/**
 * The sign-off's mail (docs/signoff.md): the team's possible approvers hear of a proposal, the
 * proposer of the decision. Sent after the step is committed; a failure is logged and never
 * undoes the step.
 */
import { sendMail } from "../infra/mail.server";
import { mayDecide, type RecordPerson, type SignoffJson } from "../domain/signoff";
import type { SignoffCaller } from "./signoffs.server";
import { teamData } from "./team-data.server";

function link(caller: SignoffCaller, s: SignoffJson): string {
  return caller.origin ? `${caller.origin}/vehicles/${s.vehicleId}/signoffs/${s.id}` : "";
}

/** Tells the team's possible approvers (never the proposer) that a proposal waits. */
export async function mailApprovers(
  teamId: number,
  s: SignoffJson,
  identifier: string,
  proposer: RecordPerson,
  caller: SignoffCaller,
): Promise<void> {
  const { signoffApprovers, name } = await teamData(teamId).team();
  const members = await teamData(teamId).members();
  const approvers = members.filter(
    (m) =>
      mayDecide({ approvers: signoffApprovers, caller: m, proposedBy: s.proposedBy.id }) === null,
  );
  const url = link(caller, s);
  await Promise.all(
    approvers.map((m) =>
      sendMail({
        kind: "signoff",
        teamId,
        to: m.email,
        subject: `Sign-off of ${identifier} damper variant ${s.damperVariant} awaits your approval`,
        text: [
          `${proposer.name} proposes to sign off damper variant ${s.damperVariant} of vehicle ${identifier} (${name}), claiming ${s.claims.length} target(s).`,
          s.note ? `\nNote: ${s.note}\n` : "",
          url
            ? `Review the evidence and approve or reject it: ${url}`
            : "Open the vehicle's Sign-off card in Twistlog to review it.",
        ].join("\n"),
      }).catch((error: unknown) => logMailFailure(error)),
    ),
  );
}

/** Tells the proposer the decision. */
export async function mailProposer(
  teamId: number,
  s: SignoffJson,
  decision: "approved" | "rejected",
  by: RecordPerson,
  caller: SignoffCaller,
): Promise<void> {
  if (!s.proposedBy.email) return;
  const url = link(caller, s);
  await sendMail({
    kind: "signoff",
    teamId,
    to: s.proposedBy.email,
    subject: `Sign-off ${s.id} (damper variant ${s.damperVariant}) was ${decision} by ${by.name}`,
    text: [
      `${by.name} ${decision} your sign-off of damper variant ${s.damperVariant}.`,
      s.decisionComment ? `\nComment: ${s.decisionComment}\n` : "",
      url,
    ].join("\n"),
  }).catch((error: unknown) => logMailFailure(error));
}

/** A failed message never undoes the step it reports; it is logged (redacted) and left. */
function logMailFailure(error: unknown): void {
  console.error(
    `sign-off mail not sent: ${error instanceof Error ? error.message : String(error)}`,
  );
}
