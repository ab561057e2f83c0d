import { and, count, eq, gt } from "drizzle-orm";
import { signInFailures } from "~/db/schema";
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

/** True when this e-mail or this address has used up its failures in the window. */
export async function isThrottled(email: string, ip: string): Promise<boolean> {
  const since = windowStart();
  const [byAccount] = await db
    .select({ n: count() })
    .from(signInFailures)
    .where(and(eq(signInFailures.email, email), gt(signInFailures.createdAt, since)));
  if ((byAccount?.n ?? 0) >= THROTTLE.perAccount) return true;
  const [byAddress] = await db
    .select({ n: count() })
    .from(signInFailures)
    .where(and(eq(signInFailures.ip, ip), gt(signInFailures.createdAt, since)));
  return (byAddress?.n ?? 0) >= THROTTLE.perAddress;
}

export async function recordFailure(email: string, ip: string): Promise<void> {
  await db.insert(signInFailures).values({ email: email.slice(0, 254), ip });
}

/** After a successful sign-in or a password reset the account's count starts again. */
export async function clearFailures(email: string): Promise<void> {
  await db.delete(signInFailures).where(eq(signInFailures.email, email));
}
