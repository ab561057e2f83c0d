import { asc, eq } from "drizzle-orm";
import { memberships, teams, users, type Role } from "~/lib/infra/db/schema";
import { db } from "../infra/db.server";

/** A team the user is in, with their role there. */
export interface TeamRole {
  id: number;
  name: string;
  role: Role;
}

/**
 * An account and the teams it is in (by name), or null when the account is gone. The http
 * layer's access check (app/lib/http/access.server.ts) reads the signed-in user through this.
 */
export async function accountWithTeams(
  userId: number,
): Promise<{ user: { id: number; email: string; name: string }; teams: TeamRole[] } | null> {
  const [user] = await db
    .select({ id: users.id, email: users.email, name: users.name })
    .from(users)
    .where(eq(users.id, userId));
  if (!user) return null;
  const mine = await db
    .select({ id: teams.id, name: teams.name, role: memberships.role })
    .from(memberships)
    .innerJoin(teams, eq(teams.id, memberships.teamId))
    .where(eq(memberships.userId, user.id))
    .orderBy(asc(teams.name));
  return { user, teams: mine };
}
