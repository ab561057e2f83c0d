import type { Role } from "~/lib/infra/db/schema";
import { findApiCaller, type ApiCaller } from "../data/api-tokens.server";
import { atLeast, roleLabels } from "../domain/roles";

// Helpers for the JSON API under /api/v1/. Every error has the same shape:
// { "error": { "code": "...", "message": "..." } }.

export function apiError(status: number, code: string, message: string): Response {
  const headers: Record<string, string> = { "Cache-Control": "no-store" };
  if (status === 401) headers["WWW-Authenticate"] = 'Bearer realm="twistlog"';
  return Response.json({ error: { code, message } }, { status, headers });
}

/** The caller of an API request, or a thrown 401 JSON error. */
export async function requireApiCaller(request: Request): Promise<ApiCaller> {
  const header = request.headers.get("Authorization") ?? "";
  const match = /^Bearer\s+(\S{1,200})$/i.exec(header);
  if (!match) {
    throw apiError(401, "unauthorized", "Send an API token: Authorization: Bearer <token>.");
  }
  const caller = await findApiCaller(match[1]!);
  if (!caller) {
    throw apiError(401, "unauthorized", "This API token is unknown, revoked or expired.");
  }
  return caller;
}

/** The caller, whose role in the token's team must be at least `needed` (else 403). */
export async function requireApiRole(request: Request, needed: Role): Promise<ApiCaller> {
  const caller = await requireApiCaller(request);
  if (!atLeast(caller.role, needed)) {
    throw apiError(
      403,
      "forbidden",
      `This needs the ${roleLabels[needed]} role or higher; the token's owner is ${roleLabels[caller.role]}.`,
    );
  }
  return caller;
}
