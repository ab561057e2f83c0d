import { and, desc, eq, isNull, lt, ne, or } from "drizzle-orm";
import { apiTokens, memberships, teams, users, type Role } from "~/lib/infra/db/schema";
import { db } from "../infra/db.server";
import { newSecret, sha256Hex } from "../infra/secrets.server";

/** Tokens start with this, so a leaked one is easy to recognise (and to scan for). */
export const TOKEN_PREFIX = "twl_";

/** Creates a token and returns it; only its sha256 is kept, so it can be shown this once. */
export async function createApiToken(input: {
  userId: number;
  teamId: number;
  name: string;
  expiresAt: Date | null;
}): Promise<{ id: number; token: string }> {
  const token = newSecret(TOKEN_PREFIX);
  const [row] = await db
    .insert(apiTokens)
    .values({ ...input, tokenHash: sha256Hex(token), prefix: token.slice(0, 10) })
    .$returningId();
  return { id: row!.id, token };
}

/** The user's tokens that are not revoked, newest first, with their team's name. */
export function listApiTokens(userId: number) {
  return db
    .select({
      id: apiTokens.id,
      name: apiTokens.name,
      prefix: apiTokens.prefix,
      teamName: teams.name,
      expiresAt: apiTokens.expiresAt,
      lastUsedAt: apiTokens.lastUsedAt,
      createdAt: apiTokens.createdAt,
    })
    .from(apiTokens)
    .innerJoin(teams, eq(teams.id, apiTokens.teamId))
    .where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)))
    .orderBy(desc(apiTokens.createdAt));
}

/** Live tokens of the team's other members, for its admins (docs/architecture.md §2). */
export function listTeamApiTokens(teamId: number, exceptUserId: number) {
  return db
    .select({
      id: apiTokens.id,
      name: apiTokens.name,
      prefix: apiTokens.prefix,
      ownerEmail: users.email,
      expiresAt: apiTokens.expiresAt,
      lastUsedAt: apiTokens.lastUsedAt,
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(
      and(
        eq(apiTokens.teamId, teamId),
        ne(apiTokens.userId, exceptUserId),
        isNull(apiTokens.revokedAt),
      ),
    )
    .orderBy(desc(apiTokens.createdAt));
}

/**
 * Revokes a live token that is the user's own, or (with `adminOfTeam`) any in that team.
 * Returns its team and name, or null when there is no such token for this caller.
 */
export async function revokeApiToken(userId: number, tokenId: number, adminOfTeam?: number) {
  const owner = adminOfTeam ? eq(apiTokens.teamId, adminOfTeam) : eq(apiTokens.userId, userId);
  const [token] = await db
    .select({ teamId: apiTokens.teamId, name: apiTokens.name })
    .from(apiTokens)
    .where(and(eq(apiTokens.id, tokenId), owner, isNull(apiTokens.revokedAt)));
  if (!token) return null;
  await db.update(apiTokens).set({ revokedAt: new Date() }).where(eq(apiTokens.id, tokenId));
  return token;
}

export interface ApiCaller {
  user: { id: number; email: string; name: string };
  team: { id: number; name: string };
  role: Role;
  tokenId: number;
}

/**
 * The caller behind `Authorization: Bearer <token>`, with the owner's *current* role in the
 * token's team (a removed member's tokens stop working), or null when the token is unknown,
 * revoked or expired.
 */
export async function findApiCaller(token: string): Promise<ApiCaller | null> {
  const [row] = await db
    .select({
      tokenId: apiTokens.id,
      expiresAt: apiTokens.expiresAt,
      userId: users.id,
      email: users.email,
      name: users.name,
      teamId: teams.id,
      teamName: teams.name,
      role: memberships.role,
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .innerJoin(teams, eq(teams.id, apiTokens.teamId))
    .innerJoin(
      memberships,
      and(eq(memberships.userId, apiTokens.userId), eq(memberships.teamId, apiTokens.teamId)),
    )
    .where(and(eq(apiTokens.tokenHash, sha256Hex(token)), isNull(apiTokens.revokedAt)));
  if (!row || (row.expiresAt && row.expiresAt <= new Date())) return null;
  // At most once a minute per token: a script's parallel requests would otherwise all write the
  // one row, and on Galera concurrent writes of a row from several nodes fail certification.
  const now = new Date();
  await db
    .update(apiTokens)
    .set({ lastUsedAt: now })
    .where(
      and(
        eq(apiTokens.id, row.tokenId),
        or(
          isNull(apiTokens.lastUsedAt),
          lt(apiTokens.lastUsedAt, new Date(now.getTime() - 60_000)),
        ),
      ),
    );
  return {
    user: { id: row.userId, email: row.email, name: row.name },
    team: { id: row.teamId, name: row.teamName },
    role: row.role,
    tokenId: row.tokenId,
  };
}
