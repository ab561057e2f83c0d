import { and, count, eq, gt } from "drizzle-orm";
import { signInFailures } from "~/lib/infra/db/schema";
import { db } from "./db.server";

/**
 * Sign-in throttling, kept in the database so a restart does not reset it. Per account:
 * 5 failures in 15 minutes lock that e-mail address (known or not, so the lock reveals
 * nothing). Per client address: 20 failures in 15 minutes, enough for an office behind one
 * NAT address but not for guessing. Figures are common practice (OWASP's authentication
 * cheat sheet recommends account lockout/throttling without fixing numbers).
 */
export const THROTTLE = { perAccount: 5, perAddress: 20, windowMinutes: 15 } as const;

const windowStart = () => new Date(Date.now() - THROTTLE.windowMinutes * 60_000);

/**
 * Records this attempt as a failure first, then counts it with every other in the window, and
 * returns false (removing its row again) when that is over a limit. Counting after the insert
 * makes parallel attempts safe: whichever of them counts last sees all the others' rows, so at
 * most `perAccount` attempts per address get their password checked. A right password then
 * clears the rows (clearFailures); a wrong one leaves its row as the recorded failure.
 */
export async function reserveAttempt(email: string, ip: string): Promise<boolean> {
  const [row] = await db
    .insert(signInFailures)
    .values({ email: email.slice(0, 254), ip })
    .$returningId();
  const since = windowStart();
  const [byAccount] = await db
    .select({ n: count() })
    .from(signInFailures)
    .where(and(eq(signInFailures.email, email.slice(0, 254)), gt(signInFailures.createdAt, since)));
  const [byAddress] = await db
    .select({ n: count() })
    .from(signInFailures)
    .where(and(eq(signInFailures.ip, ip), gt(signInFailures.createdAt, since)));
  const allowed =
    (byAccount?.n ?? 0) <= THROTTLE.perAccount && (byAddress?.n ?? 0) <= THROTTLE.perAddress;
  // A refused attempt is not a checked guess: it does not lengthen the lock.
  if (!allowed && row) await db.delete(signInFailures).where(eq(signInFailures.id, row.id));
  return allowed;
}

/** After a successful sign-in or a password reset the account's count starts again. */
export async function clearFailures(email: string): Promise<void> {
  await db.delete(signInFailures).where(eq(signInFailures.email, email));
}
