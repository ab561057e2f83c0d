import { eq } from "drizzle-orm";
import { Authenticator } from "remix-auth";
import { FormStrategy } from "remix-auth-form";
import { users } from "~/lib/infra/db/schema";
import { audit } from "../data/audit.server";
import { db } from "../infra/db.server";
import { verifyPassword } from "../infra/password.server";
import { clearFailures, reserveAttempt } from "../infra/throttle.server";
import { emailField, passwordField } from "../domain/validation";

export interface SignedInUser {
  id: number;
  email: string;
}

/** Why a sign-in was refused. The message never says whether the e-mail exists. */
export class SignInRefused extends Error {
  override name = "SignInRefused";
  constructor(readonly reason: "invalid" | "throttled") {
    super(
      reason === "throttled"
        ? "Too many failed sign-ins for this account or from this address. Wait 15 minutes, or reset your password."
        : "The e-mail address or the password is not right.",
    );
  }
}

/**
 * remix-auth with remix-auth-form: checks `email` and `password` from the posted form against
 * the argon2id hash, with throttling and audit entries. Built per request because the verify
 * callback needs the client's address, which only the server's load context knows.
 */
function passwordAuthenticator(ip: string) {
  return new Authenticator<SignedInUser>().use(
    new FormStrategy(async ({ form }) => {
      const email = emailField.parse(form.get("email"));
      const password = passwordField.parse(form.get("password"));
      // The attempt is recorded before the password is checked (throttle.server.ts).
      if (!(await reserveAttempt(email, ip))) {
        await audit({ teamId: null, actor: { id: null, email }, action: "sign-in-throttled", ip });
        throw new SignInRefused("throttled");
      }
      const [user] = await db
        .select({ id: users.id, email: users.email, passwordHash: users.passwordHash })
        .from(users)
        .where(eq(users.email, email));
      // verifyPassword(null, …) spends the same time, so timing does not tell either.
      if (!(await verifyPassword(user?.passwordHash ?? null, password)) || !user) {
        await audit({
          teamId: null,
          actor: { id: user?.id ?? null, email },
          action: "sign-in-failed",
          detail: user ? "wrong password" : "unknown e-mail address",
          ip,
        });
        throw new SignInRefused("invalid");
      }
      await clearFailures(email);
      await audit({ teamId: null, actor: { id: user.id, email }, action: "sign-in", ip });
      return { id: user.id, email: user.email };
    }),
    "form",
  );
}

/** Signs in from a posted form (read with request.clone() before, never the original). */
export function authenticateWithPassword(request: Request, ip: string): Promise<SignedInUser> {
  return passwordAuthenticator(ip).authenticate("form", request);
}
