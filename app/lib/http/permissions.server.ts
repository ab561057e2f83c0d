import { asc, eq } from "drizzle-orm";
import { redirect } from "react-router";
import { memberships, teams, users, type Role } from "~/lib/infra/db/schema";
import { db } from "../infra/db.server";
import { atLeast, roleLabels } from "../domain/roles";
import { readSession } from "./session.server";

export interface TeamRole {
  id: number;
  name: string;
  role: Role;
}

export interface CurrentUser {
  user: { id: number; email: string; name: string };
  sessionId: string;
  /** The team chosen in the team switcher (the first one when none is chosen). */
  team: TeamRole | null;
  teams: TeamRole[];
}

/** Throws a Response with `status` and a plain message unless `condition` holds. */
export function invariantResponse(
  condition: unknown,
  message: string,
  init: { status: number } = { status: 400 },
): asserts condition {
  if (!condition) {
    throw new Response(message, { status: init.status, headers: { "Content-Type": "text/plain" } });
  }
}

/** The signed-in user with their teams, or null. */
export async function getCurrentUser(request: Request): Promise<CurrentUser | null> {
  const session = await readSession(request);
  if (!session) return null;
  const [user] = await db
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .where(eq(users.id, session.userId));
  if (!user) return null;
  const mine = await db
    .select({ id: teams.id, name: teams.name, role: memberships.role })
    .from(memberships)
    .innerJoin(teams, eq(teams.id, memberships.teamId))
    .where(eq(memberships.userId, user.id))
    .orderBy(asc(teams.name));
  const team = mine.find((t) => t.id === session.teamId) ?? mine[0] ?? null;
  return { user, sessionId: session.id, team, teams: mine };
}

/**
 * The signed-in user, or the request ends: a page (GET) redirects to /sign-in and comes back
 * afterwards; anything else (a form post, a fetch) gets 401.
 */
export async function requireUser(request: Request): Promise<CurrentUser> {
  const current = await getCurrentUser(request);
  if (current) return current;
  if (request.method === "GET" || request.method === "HEAD") {
    const url = new URL(request.url);
    throw redirect(`/sign-in?redirectTo=${encodeURIComponent(url.pathname + url.search)}`);
  }
  throw new Response("Please sign in first.", { status: 401 });
}

/**
 * The user's role in team `teamId` must be at least `needed`: 404 when they are not in that
 * team at all (another team's things do not exist for them), 403 when the role is too low.
 */
export async function requireRole(
  request: Request,
  teamId: number,
  needed: Role,
): Promise<CurrentUser & { team: TeamRole }> {
  return assertRole(await requireUser(request), teamId, needed);
}

/** requireRole for the team chosen in the team switcher. */
export async function requireTeamRole(
  request: Request,
  needed: Role,
): Promise<CurrentUser & { team: TeamRole }> {
  const current = await requireUser(request);
  invariantResponse(current.team, "You are not in a team yet: ask an admin for an invitation.", {
    status: 403,
  });
  return assertRole(current, current.team.id, needed);
}

function assertRole(current: CurrentUser, teamId: number, needed: Role) {
  const team = current.teams.find((t) => t.id === teamId);
  invariantResponse(team, "Not found in your teams.", { status: 404 });
  invariantResponse(
    atLeast(team.role, needed),
    `This needs the ${roleLabels[needed]} role or higher; you are ${roleLabels[team.role]} in ${team.name}.`,
    { status: 403 },
  );
  return { ...current, team };
}
