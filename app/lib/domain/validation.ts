import { z } from "zod";
import { ROLES } from "./roles";

// Field schemas shared by the browser (conform's hints) and the actions (the real check).
// Limits match the database columns (app/lib/infra/db/schema.ts), so nothing is ever cut silently.

export const emailField = z
  .string({ error: "Enter an e-mail address." })
  .trim()
  .max(254, "An e-mail address has at most 254 characters.")
  .pipe(z.email("That is not an e-mail address (it looks like name@example.com)."))
  .transform((e) => e.toLowerCase());

/** A password being checked: any length up to the limit (argon2 has no limit, we do). */
export const passwordField = z
  .string({ error: "Enter your password." })
  .max(200, "A password has at most 200 characters.");

/** A password being chosen. 10 characters is NIST SP 800-63B's floor (8) with a margin. */
export const newPasswordField = z
  .string({ error: "Choose a password." })
  .min(10, "Use at least 10 characters.")
  .max(200, "A password has at most 200 characters.");

export const nameField = z
  .string({ error: "Enter a name." })
  .trim()
  .min(1, "Enter a name.")
  .max(120, "A name has at most 120 characters.");

export const roleField = z.enum(ROLES, { error: "Choose one of the roles." });
