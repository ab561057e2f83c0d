/**
 * The team page's "Sign-off approvers" (issue 16): who may approve or reject a sign-off besides
 * never its proposer (domain/signoff.ts mayDecide). Only admins change it: it decides who may
 * release a damper variant. Every change is audited. Returns null for any other intent.
 */
import { z } from "zod";
import { data } from "react-router";
import { audit } from "../data/audit.server";
import { teamData } from "../data/team-data.server";
import { SIGNOFF_APPROVERS } from "../domain/signoff";
import { signoffApproverLabels } from "../domain/signoff-text";
import { requireAccess } from "./access.server";

const approversSchema = z.object({
  approvers: z.enum(SIGNOFF_APPROVERS, {
    error: "Choose who approves sign-offs: any engineer or admin, or only an admin.",
  }),
});

export async function signoffSettingsAction(request: Request, form: FormData, ip: string) {
  if (form.get("intent") !== "set-signoff-approvers") return null;
  const { team, user } = await requireAccess(request, "admin");
  const parsed = approversSchema.safeParse({ approvers: form.get("approvers") });
  if (!parsed.success)
    return data({ approversError: parsed.error.issues[0]!.message }, { status: 400 });
  const { approvers } = parsed.data;
  await teamData(team.id).setSignoffApprovers(approvers);
  await audit({
    teamId: team.id,
    actor: user,
    action: "team-settings-changed",
    detail: `sign-off approvers: ${approvers}`,
    ip,
  });
  return { notice: `Sign-offs are now approved by: ${signoffApproverLabels[approvers]}.` };
}
