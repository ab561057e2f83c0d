/**
 * The team page's ingest settings (issue 14): the team's logger channel names and the strict
 * flag. Engineers and admins change them (like the amplitude unit: settings of the people who
 * analyse); every change is audited. Returns null for an intent that is not one of these.
 */
import { parseWithZod } from "@conform-to/zod/v4";
import { data } from "react-router";
import { z } from "zod";
import { audit } from "../data/audit.server";
import { teamData } from "../data/team-data.server";
import {
  addChannelNameSchema,
  channelKey,
  channelNamesSchema,
  roleLabels,
} from "../domain/channel-names";
import { Invalid } from "../domain/errors";
import { requireAccess } from "./access.server";

const removeSchema = z.object({ name: z.string().trim().min(1).max(120) });
const strictSchema = z.object({ strict: z.enum(["on", "off"]) });

export async function ingestSettingsAction(request: Request, form: FormData, ip: string) {
  const intent = form.get("intent");
  if (intent !== "add-channel-name" && intent !== "remove-channel-name" && intent !== "set-strict")
    return null;
  const { team, user } = await requireAccess(request, "engineer");
  const scoped = teamData(team.id);
  const current = await scoped.ingestSettings();
  const record = (detail: string) =>
    audit({ teamId: team.id, actor: user, action: "team-settings-changed", detail, ip });

  if (intent === "add-channel-name") {
    const submission = parseWithZod(form, { schema: addChannelNameSchema });
    if (submission.status !== "success")
      return data({ channelName: submission.reply() }, { status: 400 });
    const { intent: _, ...entry } = submission.value;
    // A name already in the list is replaced: the newest role and unit for it win.
    const list = [
      ...current.channelNames.filter((c) => channelKey(c.name) !== channelKey(entry.name)),
      entry,
    ];
    const checked = channelNamesSchema.safeParse(list);
    if (!checked.success)
      return data(
        { channelName: submission.reply({ formErrors: [checked.error.issues[0]!.message] }) },
        { status: 400 },
      );
    await scoped.setChannelNames(checked.data);
    const unit = entry.unit ? ` in ${entry.unit}` : "";
    await record(`channel name “${entry.name}” → ${entry.role}${unit}`);
    return {
      channelName: submission.reply({ resetForm: true }),
      notice: `“${entry.name}” is now read as ${roleLabels[entry.role].toLowerCase()}${unit} in this team's uploads.`,
    };
  }

  if (intent === "remove-channel-name") {
    const parsed = removeSchema.safeParse(Object.fromEntries(form));
    if (!parsed.success) throw new Invalid("No channel name was chosen.");
    const key = channelKey(parsed.data.name);
    const list = current.channelNames.filter((c) => channelKey(c.name) !== key);
    if (list.length === current.channelNames.length)
      throw new Invalid(`“${parsed.data.name}” is not in the team's channel names.`);
    await scoped.setChannelNames(list);
    await record(`channel name “${parsed.data.name}” removed`);
    return { notice: `“${parsed.data.name}” is no longer one of the team's channel names.` };
  }

  const parsed = strictSchema.safeParse(Object.fromEntries(form));
  if (!parsed.success) throw new Invalid("Choose whether imperfect logs are refused.");
  const strict = parsed.data.strict === "on";
  await scoped.setStrictIngest(strict);
  await record(strict ? "strict ingest on" : "strict ingest off");
  return {
    notice: strict
      ? "New analyses refuse drive logs with dropouts, gaps or uneven timestamps."
      : "New analyses repair short dropouts, gaps and uneven timestamps, and say so.",
  };
}
