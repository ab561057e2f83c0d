import { randomBytes } from "node:crypto";
import { inArray } from "drizzle-orm";
import { createApiToken } from "~/lib/data/api-tokens.server";
import { memberships, teams, users } from "~/lib/infra/db/schema";
import { db } from "~/lib/infra/db.server";
import { hashPassword } from "~/lib/infra/password.server";
import type { Role } from "~/lib/domain/roles";

// Fresh teams and accounts for one test, with random names, so tests never share state with
// each other or with the demo accounts (which the browser tests also use).

export const TEST_PASSWORD = "correct horse battery";

export interface TestAccount {
  id: number;
  email: string;
  name: string;
  role: Role;
  membershipId: number;
}

export interface TestTeam {
  id: number;
  name: string;
  accounts: Record<Role, TestAccount>;
}

/** A new API token (never expiring) of the team's account with `role`, named `name`. */
export async function apiTokenOf(team: TestTeam, role: Role, name: string): Promise<string> {
  const account = team.accounts[role];
  return (await createApiToken({ userId: account.id, teamId: team.id, name, expiresAt: null }))
    .token;
}

/** A team with one account per role, all with TEST_PASSWORD. */
export async function createTestTeam(label = "Test"): Promise<TestTeam> {
  const tag = randomBytes(5).toString("hex");
  const name = `${label} team ${tag}`;
  const [team] = await db
    .insert(teams)
    .values({ name, slug: `t-${tag}` })
    .$returningId();
  const passwordHash = await hashPassword(TEST_PASSWORD);
  const accounts = {} as Record<Role, TestAccount>;
  for (const role of ["admin", "engineer", "technician", "viewer"] as const) {
    const email = `${role}-${tag}@example.test`;
    const displayName = `${role[0]!.toUpperCase()}${role.slice(1)} ${tag}`;
    const [user] = await db
      .insert(users)
      .values({ email, name: displayName, passwordHash })
      .$returningId();
    const [m] = await db
      .insert(memberships)
      .values({ teamId: team!.id, userId: user!.id, role })
      .$returningId();
    accounts[role] = { id: user!.id, email, name: displayName, role, membershipId: m!.id };
  }
  return { id: team!.id, name, accounts };
}

export async function userIdsOf(emails: string[]) {
  return db
    .select({ id: users.id, email: users.email })
    .from(users)
    .where(inArray(users.email, emails));
}
