import type { Role } from "~/lib/infra/db/schema";
import { apiError, requireApiRole } from "./api.server";
import {
  DATABASE_UNAVAILABLE_MESSAGE,
  databaseUnavailable,
  describeDbError,
} from "../infra/db-errors.server";
import { getEnv } from "../infra/env.server";
import { requestLabel } from "../base/log-redaction";
import { getCurrentUser } from "./permissions.server";
import { atLeast, roleLabels } from "../domain/roles";

export interface ApiAccess {
  userId: number;
  teamId: number;
  role: Role;
  user: { id: number; email: string };
  team: { id: number; name: string };
}

/**
 * API v1 authentication: `Authorization: Bearer <token>` (scripts) or the browser's session
 * cookie (the app's own pages fetch the same JSON). The role is checked the same way for both;
 * errors are the API's JSON shape (401 not signed in, 403 role too low).
 */
export async function requireApiAccess(request: Request, needed: Role): Promise<ApiAccess> {
  if (request.headers.has("Authorization")) {
    const caller = await requireApiRole(request, needed);
    return {
      userId: caller.user.id,
      teamId: caller.team.id,
      role: caller.role,
      user: caller.user,
      team: caller.team,
    };
  }
  // A cookie rides along on any request the browser makes, so a write with the cookie must
  // come from our own pages (SameSite=Lax already stops most cross-site posts; this stops the rest).
  if (
    !["GET", "HEAD"].includes(request.method) &&
    request.headers.get("Origin") !== new URL(request.url).origin
  ) {
    throw apiError(
      403,
      "forbidden",
      "A write with the session cookie must come from Twistlog's own pages; scripts use an API token.",
    );
  }
  const current = await getCurrentUser(request);
  if (!current)
    throw apiError(
      401,
      "unauthorized",
      "Sign in, or send an API token: Authorization: Bearer <token>.",
    );
  if (!current.team)
    throw apiError(403, "forbidden", "You are not in a team yet: ask an admin for an invitation.");
  if (!atLeast(current.team.role, needed)) {
    throw apiError(
      403,
      "forbidden",
      `This needs the ${roleLabels[needed]} role or higher; you are ${roleLabels[current.team.role]}.`,
    );
  }
  const { id, email } = current.user;
  return {
    userId: id,
    teamId: current.team.id,
    role: current.team.role,
    user: { id, email },
    team: { id: current.team.id, name: current.team.name },
  };
}

/**
 * Wraps an API loader or action so that every refusal leaves in the API's JSON error shape:
 * the data helpers throw plain-text 404s (shared with the pages), turned here into
 * { "error": { "code", "message" } } with the same status. A database that cannot be reached
 * is 503 `database_unavailable` (one line in the log, without a stack); anything else is a bug
 * and goes on to React Router's handleError (app/entry.server.tsx).
 */
export function apiRoute<A extends { request: Request }>(
  handler: (args: A) => Promise<Response>,
): (args: A) => Promise<Response> {
  return async (args) => {
    try {
      return await handler(args);
    } catch (error) {
      if (
        error instanceof Response &&
        !(error.headers.get("Content-Type") ?? "").includes("json")
      ) {
        const codes: Record<number, string> = {
          400: "bad_request",
          401: "unauthorized",
          403: "forbidden",
          404: "not_found",
          405: "method_not_allowed",
          413: "too_large",
          503: "database_unavailable",
        };
        return apiError(
          error.status,
          codes[error.status] ?? "error",
          (await error.text()) || "Request refused.",
        );
      }
      const down = databaseUnavailable(error);
      if (down) {
        console.error(`503 ${requestLabel(args.request)}: ${describeDbError(down, getEnv())}`);
        const response = apiError(503, "database_unavailable", DATABASE_UNAVAILABLE_MESSAGE);
        response.headers.set("Retry-After", "30");
        return response;
      }
      throw error;
    }
  };
}
