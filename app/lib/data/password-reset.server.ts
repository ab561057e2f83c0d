import { and, eq, gt, isNull } from "drizzle-orm";
import { writeTransaction } from "../infra/db-errors.server";
import { passwordResets, sessions, users } from "~/lib/infra/db/schema";
import { db } from "../infra/db.server";
import { RESET_MINUTES } from "../domain/link-lifetimes";
import { sendMail } from "../infra/mail.server";
import { hashPassword } from "../infra/password.server";
import { newSecret, sha256Hex } from "../infra/secrets.server";
import { clearFailures } from "../infra/throttle.server";

/**
 * E-mails a reset link when the address has an account; does nothing otherwise. The caller
 * shows the same answer either way, so the form does not reveal who has an account.
 * Returns the user's id when a link was sent (for the audit log).
 */
export async function requestPasswordReset(email: string, origin: string): Promise<number | null> {
  const [user] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
  if (!user) return null;
  const token = newSecret();
  await db.insert(passwordResets).values({
    userId: user.id,
    tokenHash: sha256Hex(token),
    expiresAt: new Date(Date.now() + RESET_MINUTES * 60_000),
  });
  await sendMail({
    kind: "reset",
    teamId: null,
    to: email,
    subject: "Reset your Twistlog password",
    text: [
      "Someone (hopefully you) asked to reset the password of your Twistlog account.",
      "",
      `Choose a new password here (the link works once, for ${RESET_MINUTES} minutes):`,
      `${origin}/reset-password/${token}`,
      "",
      "If you did not ask for this, ignore this message: your password stays as it is.",
    ].join("\n"),
  });
  return user.id;
}

/** The live reset behind a link, with the account's e-mail, or null. */
export async function findPasswordReset(token: string) {
  const [row] = await db
    .select({ id: passwordResets.id, userId: users.id, email: users.email })
    .from(passwordResets)
    .innerJoin(users, eq(users.id, passwordResets.userId))
    .where(
      and(
        eq(passwordResets.tokenHash, sha256Hex(token)),
        isNull(passwordResets.usedAt),
        gt(passwordResets.expiresAt, new Date()),
      ),
    );
  return row ?? null;
}

/**
 * Sets the new password and ends every session of the user, in one transaction; the link is
 * used up even if two tabs submit at once. False when the link was used or expired meanwhile.
 */
export async function completePasswordReset(
  reset: NonNullable<Awaited<ReturnType<typeof findPasswordReset>>>,
  password: string,
): Promise<boolean> {
  const passwordHash = await hashPassword(password);
  const done = await writeTransaction(db, async (tx) => {
    const [claimed] = await tx
      .update(passwordResets)
      .set({ usedAt: new Date() })
      .where(
        and(
          eq(passwordResets.id, reset.id),
          isNull(passwordResets.usedAt),
          gt(passwordResets.expiresAt, new Date()),
        ),
      );
    if (claimed.affectedRows !== 1) return false;
    await tx.update(users).set({ passwordHash }).where(eq(users.id, reset.userId));
    await tx.delete(sessions).where(eq(sessions.userId, reset.userId));
    // Other open links of this user die too: a new password should be the last word.
    await tx
      .update(passwordResets)
      .set({ usedAt: new Date() })
      .where(and(eq(passwordResets.userId, reset.userId), isNull(passwordResets.usedAt)));
    return true;
  });
  if (done) await clearFailures(reset.email);
  return done;
}
