import type { AppLoadContext } from "react-router";
import { getEnv } from "../infra/env.server";

declare module "react-router" {
  interface AppLoadContext {
    /** Per-request nonce for the Content-Security-Policy (server/index.ts). */
    cspNonce?: string;
    /** The client's address as Express sees it (req.ip). */
    clientIp?: string;
  }
}

/** The client's IP address for the audit log and throttling; "unknown" outside the server. */
export function clientIp(context: AppLoadContext | undefined): string {
  return (context?.clientIp ?? "unknown").replace(/^::ffff:/, "").slice(0, 45);
}

/**
 * Whether cookies should be Secure: the request came over https, or the app's public address is
 * https. `npm start` and the tests serve plain http on localhost, so NODE_ENV alone cannot decide.
 */
export function isSecureRequest(request: Request): boolean {
  return new URL(request.url).protocol === "https:" || !!getEnv().APP_URL?.startsWith("https:");
}

/** Origin of the app for links in e-mails: APP_URL when set, else the request's own origin. */
export function appOrigin(request: Request): string {
  const configured = getEnv().APP_URL;
  return configured ? new URL(configured).origin : new URL(request.url).origin;
}

/** A same-site path to go to after sign-in; anything else (//evil, https://…) becomes `fallback`. */
export function safeRedirect(
  to: FormDataEntryValue | string | null | undefined,
  fallback = "/vehicles",
) {
  if (typeof to !== "string" || !to.startsWith("/") || to.startsWith("//") || to.includes("\\")) {
    return fallback;
  }
  return to;
}
