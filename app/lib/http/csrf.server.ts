import { createCookie } from "react-router";
import { getEnv } from "../infra/env.server";
import { isSecureRequest } from "./request.server";
import { newSecret, sameSecret } from "../infra/secrets.server";

/**
 * CSRF protection (docs/decisions/005-csrf.md): SameSite=Lax cookies; React Router's own
 * Origin check on every action (400 for a foreign Origin); and a signed token cookie whose
 * value every state-changing form repeats in a hidden `csrf` field (403 without it). The token
 * works before sign-in too (sign-in, password reset, invitations).
 */
const csrfCookie = createCookie("twistlog_csrf", {
  httpOnly: true,
  sameSite: "lax",
  path: "/",
  secrets: [getEnv().SESSION_SECRET],
});

export const CSRF_FIELD = "csrf";

/** The token for this browser, and a Set-Cookie header when it had none (or a forged one). */
export async function issueCsrfToken(
  request: Request,
): Promise<{ token: string; setCookie: string | null }> {
  const existing: unknown = await csrfCookie.parse(request.headers.get("Cookie"));
  if (typeof existing === "string" && existing.length >= 40) {
    return { token: existing, setCookie: null };
  }
  const token = newSecret();
  return {
    token,
    setCookie: await csrfCookie.serialize(token, { secure: isSecureRequest(request) }),
  };
}

/**
 * Throws 403 when the browser says the request came from another site's page. React Router
 * checks the Origin of page actions itself, but not of resource routes; this makes one check
 * for every action. No Origin header (scripts, which still need the token) passes; the app's
 * own origin is the request's, or APP_URL's behind a proxy that rewrites the host.
 */
export function assertSameOrigin(request: Request): void {
  const origin = request.headers.get("Origin");
  if (origin === null) return;
  const appUrl = getEnv().APP_URL;
  const own = [new URL(request.url).origin, appUrl ? new URL(appUrl).origin : null];
  if (!own.includes(origin)) {
    throw new Response(
      "This form was sent from a page of another site, so nothing was changed. Open Twistlog itself and try again.",
      { status: 403, headers: { "Content-Type": "text/plain" } },
    );
  }
}

/**
 * Throws 403 unless the request comes from our own pages (Origin) and the form's token matches
 * the cookie's. First thing in every action.
 */
export async function assertCsrf(request: Request, form: FormData): Promise<void> {
  assertSameOrigin(request);
  const cookieToken: unknown = await csrfCookie.parse(request.headers.get("Cookie"));
  const formToken = form.get(CSRF_FIELD);
  if (
    typeof cookieToken !== "string" ||
    typeof formToken !== "string" ||
    !sameSecret(cookieToken, formToken)
  ) {
    throw new Response(
      "The form's security token was missing or out of date, so nothing was changed. Reload the page and try again.",
      { status: 403, headers: { "Content-Type": "text/plain" } },
    );
  }
}
