/**
 * The team page's "Trend reference speed" (issue 15). Engineers and admins change it, like the
 * amplitude unit (a setting of the people who analyse); every change is audited. Returns null
 * for any other intent.
 */
import { parseWithZod } from "@conform-to/zod/v4";
import { data } from "react-router";
import { audit } from "../data/audit.server";
import { teamData } from "../data/team-data.server";
import { trendReferenceSchema } from "../domain/trend-settings";
import { requireAccess } from "./access.server";

export async function trendSettingsAction(request: Request, form: FormData, ip: string) {
  if (form.get("intent") !== "set-trend-reference") return null;
  const { team, user } = await requireAccess(request, "engineer");
  const submission = parseWithZod(form, { schema: trendReferenceSchema });
  if (submission.status !== "success")
    return data({ trendReference: submission.reply() }, { status: 400 });
  const rpm = submission.value.referenceRpm;
  await teamData(team.id).setTrendReferenceRpm(rpm);
  await audit({
    teamId: team.id,
    actor: user,
    action: "team-settings-changed",
    detail: `trend reference speed ${rpm} rpm`,
    ip,
  });
  return {
    trendReference: submission.reply(),
    notice: `The damper-health trend now reads the isolation at ${rpm} rpm.`,
  };
}
