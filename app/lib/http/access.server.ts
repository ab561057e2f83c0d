import type { Role } from "~/lib/infra/db/schema";
import type { TeamRole } from "../data/accounts.server";
import { findApiCaller } from "../data/api-tokens.server";
import { Forbidden, NotFound, Unauthenticated } from "../domain/errors";
import { atLeast, roleLabels } from "../domain/roles";
import { requestId } from "./request-id";
import { readSessionAccount } from "./session.server";

/**
 * Who is asking and what they may do: the one place that compares a caller's role with the role
 * a request needs, and words the refusal. It throws domain errors (app/lib/domain/errors.ts);
 * the route's edge (app/lib/http/edge.server.ts) answers them: a page redirects a signed-out
 * GET to /sign-in and shows the 403/404 in its error boundary, the API answers
 * `{ error: { code, message } }` with 401/403/404.
 */

export type { TeamRole };

export interface CurrentUser {
  user: { id: number; email: string; name: string };
  /** The session's id; null for a caller with an API token. */
  sessionId: string | null;
  /** The team chosen in the team switcher (the first one when none is chosen). */
  team: TeamRole | null;
  teams: TeamRole[];
}

/** A caller admitted to a team with at least the role a request needs. */
export interface Access extends CurrentUser {
  team: TeamRole;
  teamId: number;
  userId: number;
  role: Role;
}

type SignedIn = CurrentUser & { sessionId: string };

/**
 * What one HTTP request's loaders have read of its session, by the request's id
 * (app/lib/http/request-id.ts): a page's shell and its own loader run together and then cost one
 * query. An entry is dropped a second after it was read, and no other request has its id, so a
 * later request always reads the database again (a revocation acts at once, on every instance).
 */
const perRequest = new Map<string, Promise<SignedIn | null>>();
const KEEP_MS = 1_000;

/** The signed-in user with their teams, or null. */
export function getCurrentUser(request: Request): Promise<SignedIn | null> {
  const id = requestId(request);
  if (id === null) return readCurrentUser(request);
  let found = perRequest.get(id);
  if (!found) {
    found = readCurrentUser(request);
    perRequest.set(id, found);
    const forget = () => setTimeout(() => perRequest.delete(id), KEEP_MS).unref();
    found.then(forget, forget);
  }
  return found;
}

async function readCurrentUser(request: Request): Promise<SignedIn | null> {
  const account = await readSessionAccount(request);
  if (!account) return null;
  const { session, user, teams } = account;
  const team = teams.find((t) => t.id === session.teamId) ?? teams[0] ?? null;
  return { user, teams, sessionId: session.id, team };
}

/** The signed-in user (any team, or none yet), or Unauthenticated. */
export async function requireUser(request: Request): Promise<CurrentUser & { sessionId: string }> {
  const current = await getCurrentUser(request);
  if (!current) throw new Unauthenticated("Please sign in first.");
  return current;
}

interface Options {
  /**
   * "api": /api/v1 — an `Authorization: Bearer <token>` header (scripts) or the session cookie
   * (the app's own pages fetch the same JSON). "page" (the default): the session only.
   */
  from?: "page" | "api";
  /** The team to act in; the session's chosen team when not given. */
  teamId?: number;
}

/**
 * The caller, whose role in the team must be at least `needed`: Unauthenticated when nobody is
 * signed in, NotFound when they are not in that team (another team's things do not exist for
 * them), Forbidden when the role is too low.
 */
export async function requireAccess(
  request: Request,
  needed: Role,
  options: Options & { from: "api" },
): Promise<Access>;
export async function requireAccess(
  request: Request,
  needed: Role,
  options?: Options,
): Promise<Access & { sessionId: string }>;
export async function requireAccess(
  request: Request,
  needed: Role,
  options: Options = {},
): Promise<Access> {
  const api = options.from === "api";
  if (api && request.headers.has("Authorization")) {
    const match = /^Bearer\s+(\S{1,200})$/i.exec(request.headers.get("Authorization") ?? "");
    if (!match) throw new Unauthenticated("Send an API token: Authorization: Bearer <token>.");
    const caller = await findApiCaller(match[1]!);
    if (!caller) throw new Unauthenticated("This API token is unknown, revoked or expired.");
    const team = { ...caller.team, role: caller.role };
    const current = { user: caller.user, sessionId: null, team, teams: [team] };
    return admit(current, team.id, needed, "the token's owner is");
  }
  // A cookie rides along on any request the browser makes, so an API write with the cookie must
  // come from our own pages (SameSite=Lax already stops most cross-site posts; this stops the
  // rest). Pages' forms have their CSRF token instead (csrf.server.ts).
  if (
    api &&
    !["GET", "HEAD"].includes(request.method) &&
    request.headers.get("Origin") !== new URL(request.url).origin
  ) {
    throw new Forbidden(
      "A write with the session cookie must come from Twistlog's own pages; scripts use an API token.",
    );
  }
  const current = await getCurrentUser(request);
  if (!current)
    throw new Unauthenticated(
      api
        ? "Sign in, or send an API token: Authorization: Bearer <token>."
        : "Please sign in first.",
    );
  const teamId = options.teamId ?? current.team?.id;
  if (teamId === undefined)
    throw new Forbidden("You are not in a team yet: ask an admin for an invitation.");
  return admit(current, teamId, needed, "you are");
}

function admit(current: CurrentUser, teamId: number, needed: Role, whoIs: string): Access {
  const team = current.teams.find((t) => t.id === teamId);
  if (!team) throw new NotFound("Not found in your teams.");
  if (!atLeast(team.role, needed))
    throw new Forbidden(
      `This needs the ${roleLabels[needed]} role or higher; ${whoIs} ${roleLabels[team.role]} in ${team.name}.`,
    );
  return { ...current, team, teamId: team.id, userId: current.user.id, role: team.role };
}
