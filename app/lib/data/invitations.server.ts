import { and, eq, isNull } from "drizzle-orm";
import { invitations, memberships, teams, users, type Role } from "~/lib/infra/db/schema";
import { db } from "../infra/db.server";
import { writeTransaction } from "../infra/db-errors.server";
import { INVITATION_DAYS } from "../domain/link-lifetimes";
import { sendMail } from "../infra/mail.server";
import { hashPassword } from "../infra/password.server";
import { roleLabels } from "../domain/roles";
import { newSecret, sha256Hex } from "../infra/secrets.server";

export class InvitationProblem extends Error {
  override name = "InvitationProblem";
}

/** Creates an invitation (replacing any open one for the same address) and e-mails its link. */
export async function inviteToTeam(input: {
  teamId: number;
  teamName: string;
  email: string;
  role: Role;
  invitedBy: { id: number; name: string };
  origin: string;
}): Promise<void> {
  const [already] = await db
    .select({ id: memberships.id })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.teamId, input.teamId), eq(users.email, input.email)));
  if (already) throw new InvitationProblem(`${input.email} is already a member of this team.`);

  const token = newSecret();
  const expiresAt = new Date(Date.now() + INVITATION_DAYS * 24 * 3600 * 1000);
  await writeTransaction(db, async (tx) => {
    await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(
        and(
          eq(invitations.teamId, input.teamId),
          eq(invitations.email, input.email),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
        ),
      );
    await tx.insert(invitations).values({
      teamId: input.teamId,
      email: input.email,
      role: input.role,
      tokenHash: sha256Hex(token),
      invitedBy: input.invitedBy.id,
      expiresAt,
    });
  });
  const link = `${input.origin}/invitations/${token}`;
  await sendMail({
    kind: "invitation",
    teamId: input.teamId,
    to: input.email,
    subject: `You are invited to ${input.teamName} on Twistlog`,
    text: [
      `${input.invitedBy.name} invites you to the team "${input.teamName}" on Twistlog, as ${roleLabels[input.role]}.`,
      "",
      `Accept the invitation here (the link works once, for ${INVITATION_DAYS} days):`,
      link,
      "",
      "If you did not expect this, ignore this message.",
    ].join("\n"),
  });
}

/** The open invitation behind a link, with whether its e-mail already has an account. */
export async function findInvitation(token: string) {
  const [row] = await db
    .select({
      id: invitations.id,
      teamId: invitations.teamId,
      teamName: teams.name,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
    })
    .from(invitations)
    .innerJoin(teams, eq(teams.id, invitations.teamId))
    .where(eq(invitations.tokenHash, sha256Hex(token)));
  if (!row || row.acceptedAt || row.revokedAt || row.expiresAt <= new Date()) return null;
  const [user] = await db
    .select({ id: users.id, passwordHash: users.passwordHash })
    .from(users)
    .where(eq(users.email, row.email));
  return { ...row, existingUser: user ?? null };
}

/**
 * Uses the invitation once: marks it accepted (only if nobody did first), creates the account
 * when there is none, and adds the membership. All in one transaction. Returns the user's id.
 */
export async function acceptInvitation(
  invitation: NonNullable<Awaited<ReturnType<typeof findInvitation>>>,
  newAccount: { name: string; password: string } | null,
): Promise<number> {
  const passwordHash = newAccount ? await hashPassword(newAccount.password) : null;
  return writeTransaction(db, async (tx) => {
    const [claimed] = await tx
      .update(invitations)
      .set({ acceptedAt: new Date() })
      .where(
        and(
          eq(invitations.id, invitation.id),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
        ),
      );
    if (claimed.affectedRows !== 1)
      throw new InvitationProblem("This invitation was already used.");
    let userId = invitation.existingUser?.id;
    if (!userId) {
      if (!newAccount || !passwordHash) throw new InvitationProblem("Choose a name and password.");
      const [created] = await tx
        .insert(users)
        .values({ email: invitation.email, name: newAccount.name, passwordHash })
        .$returningId();
      userId = created!.id;
    }
    await tx
      .insert(memberships)
      .values({ teamId: invitation.teamId, userId, role: invitation.role })
      .onDuplicateKeyUpdate({ set: { role: invitation.role } });
    return userId;
  });
}
