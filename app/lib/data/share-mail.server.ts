import { conditionLabels } from "../domain/drive-log-terms";
import type { ShareSubject } from "../domain/share-schema";
import { sendMail } from "../infra/mail.server";
import { createShare, shareUrl, type ShareCaller } from "./shares.server";
import { signoffData } from "./signoffs.server";
import { teamData } from "./team-data.server";
import { vehicleData } from "./vehicles.server";

/** The signed-in page of a subject, for colleagues who are in the team. */
export function inAppPath(subject: ShareSubject): string {
  if (subject.kind === "signoff")
    return `/vehicles/${subject.vehicleId}/signoffs/${subject.signoffId}`;
  return subject.kind === "log"
    ? `/vehicles/${subject.vehicleId}/logs/${subject.logId}`
    : `/vehicles/${subject.vehicleId}/compare?logs=${subject.logIds.join(",")}`;
}

/**
 * "Send by e-mail" of the share panel (issue 7): one message per address, so nobody sees the
 * other recipients. An address of a team member gets the normal in-app link (they sign in as
 * usual, with their own role); every other address gets a share link, one link made for this
 * sending, working `expiresInDays` days. Returns how many of each were sent and the link's id.
 */
export async function emailShare(input: {
  teamId: number;
  teamName: string;
  caller: ShareCaller & { name: string };
  subject: ShareSubject;
  recipients: string[];
  message: string;
  expiresInDays: number;
  allowRawDownload: boolean;
  origin: string;
}): Promise<{ members: number; guests: number; shareId: number | null }> {
  const members = new Set(
    (await teamData(input.teamId).members()).map((m) => m.email.toLowerCase()),
  );
  const toMembers = input.recipients.filter((a) => members.has(a));
  const toGuests = input.recipients.filter((a) => !members.has(a));
  const what = await describe(input.teamId, input.subject);

  let share: { id: number; token: string; expiresAt: Date } | null = null;
  if (toGuests.length) {
    share = await createShare({
      teamId: input.teamId,
      caller: input.caller,
      subject: input.subject,
      expiresInDays: input.expiresInDays,
      note: input.message,
      allowRawDownload: input.allowRawDownload,
    });
  }
  const personal = input.message
    ? ["", `${input.caller.name} writes:`, ...input.message.split("\n").map((l) => `> ${l}`), ""]
    : [""];
  const subjectLine = `${input.caller.name} shared ${what.short} with you on Twistlog`;

  for (const to of toMembers) {
    await sendMail({
      kind: "share",
      teamId: input.teamId,
      to,
      subject: subjectLine,
      text: [
        `${input.caller.name} (${input.teamName}) shared ${what.long} with you.`,
        ...personal,
        "Open it in Twistlog (sign in with your account):",
        `${input.origin}${inAppPath(input.subject)}`,
      ].join("\n"),
    });
  }
  for (const to of toGuests) {
    await sendMail({
      kind: "share",
      teamId: input.teamId,
      to,
      subject: subjectLine,
      text: [
        `${input.caller.name} (${input.teamName}) shared ${what.long} with you on Twistlog, the team application for driveline vibration results.`,
        ...personal,
        "See the results here (read only, no account needed):",
        shareUrl(input.origin, share!.token),
        "",
        `The link works until ${share!.expiresAt.toUTCString()}, unless it is revoked earlier.`,
        "If you did not expect this message, ignore it.",
      ].join("\n"),
    });
  }
  return { members: toMembers.length, guests: toGuests.length, shareId: share?.id ?? null };
}

async function describe(teamId: number, subject: ShareSubject) {
  const data = vehicleData(teamId);
  const vehicle = await data.vehicle(subject.vehicleId);
  if (subject.kind === "signoff") {
    const signoff = await signoffData(teamId).get(subject.signoffId);
    return {
      short: "a sign-off",
      long: `the sign-off of damper variant "${signoff.damperVariant}" of ${vehicle.name} (${vehicle.identifier})`,
    };
  }
  if (subject.kind === "comparison") {
    return {
      short: "a comparison",
      long: `a comparison of ${subject.logIds.length} drive logs of ${vehicle.name} (${vehicle.identifier})`,
    };
  }
  const log = await data.log(subject.logId);
  const date = log.testDate ? `, ${log.testDate}` : "";
  return {
    short: "a drive log",
    long: `the drive log "${conditionLabels[log.condition]}${date}" of ${vehicle.name} (${vehicle.identifier})`,
  };
}
