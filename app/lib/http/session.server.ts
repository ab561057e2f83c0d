import { and, asc, eq, gt, ne, sql } from "drizzle-orm";
import { createCookie } from "react-router";
import { memberships, sessions, teams, users, type Role } from "~/lib/infra/db/schema";
import { db } from "../infra/db.server";
import { getEnv } from "../infra/env.server";
import { isSecureRequest } from "./request.server";
import { newSecret, sha256Hex } from "../infra/secrets.server";

/** Sessions last 30 days from sign-in (docs/decisions/004-sessions-in-database.md). */
export const SESSION_DAYS = 30;
const SESSION_MS = SESSION_DAYS * 24 * 3600 * 1000;

/**
 * The session cookie: signed with SESSION_SECRET, httpOnly, SameSite=Lax. It carries only the
 * session secret; the database keeps that secret's sha256 as the row id.
 */
export const sessionCookie = createCookie("twistlog_session", {
  httpOnly: true,
  sameSite: "lax",
  path: "/",
  maxAge: SESSION_MS / 1000,
  secrets: [getEnv().SESSION_SECRET],
});

export interface SessionRow {
  id: string;
  userId: number;
  teamId: number | null;
}

/** The session row's id (sha256 of the cookie's secret), or null for no cookie or a bad signature. */
async function sessionId(request: Request): Promise<string | null> {
  const secret: unknown = await sessionCookie.parse(request.headers.get("Cookie"));
  if (typeof secret !== "string" || secret.length < 40) return null;
  return sha256Hex(secret);
}

/** The live session of this request, or null (no cookie, bad signature, expired or revoked). */
export async function readSession(request: Request): Promise<SessionRow | null> {
  const id = await sessionId(request);
  if (id === null) return null;
  const [row] = await db
    .select({ id: sessions.id, userId: sessions.userId, teamId: sessions.teamId })
    .from(sessions)
    .where(and(eq(sessions.id, id), gt(sessions.expiresAt, new Date())))
    .limit(1);
  return row ?? null;
}

/**
 * The query of readSessionAccount, built once: drizzle's query building was a tenth of a signed-in
 * request's CPU, and this one runs on every request.
 */
function prepareSessionAccount() {
  return db
    .select({
      sessionId: sessions.id,
      userId: users.id,
      chosenTeamId: sessions.teamId,
      email: users.email,
      name: users.name,
      teamId: teams.id,
      teamName: teams.name,
      role: memberships.role,
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .leftJoin(memberships, eq(memberships.userId, users.id))
    .leftJoin(teams, eq(teams.id, memberships.teamId))
    .where(
      and(eq(sessions.id, sql.placeholder("id")), gt(sessions.expiresAt, sql.placeholder("now"))),
    )
    .orderBy(asc(teams.name))
    .prepare();
}
let sessionAccountQuery: ReturnType<typeof prepareSessionAccount> | undefined;

/** A live session with its account and the account's teams (by name, with the role in each). */
export interface SessionAccount {
  session: SessionRow;
  user: { id: number; email: string; name: string };
  teams: { id: number; name: string; role: Role }[];
}

/**
 * The live session of this request with its user and teams, in one query (session by its
 * primary key, the user by theirs, the memberships by memberships_user_idx): every signed-in
 * request asks this, and three round trips to the database were most of what a kept chart body
 * cost (docs/serving-speed.md). Nothing is kept between requests, so a session ended or a
 * membership removed is refused at once by every instance of the app.
 */
export async function readSessionAccount(request: Request): Promise<SessionAccount | null> {
  const id = await sessionId(request);
  if (id === null) return null;
  // The expiry compared as drizzle writes a datetime (UTC text), as in readSession.
  const now = sessions.expiresAt.mapToDriverValue(new Date());
  const rows = await (sessionAccountQuery ??= prepareSessionAccount()).execute({ id, now });
  const first = rows[0];
  if (!first) return null;
  return {
    session: { id: first.sessionId, userId: first.userId, teamId: first.chosenTeamId },
    user: { id: first.userId, email: first.email, name: first.name },
    teams: rows.flatMap((r) =>
      r.teamId !== null && r.teamName !== null && r.role !== null
        ? [{ id: r.teamId, name: r.teamName, role: r.role }]
        : [],
    ),
  };
}

/** Creates a session row and returns the Set-Cookie header value that carries it. */
export async function startSession(
  request: Request,
  userId: number,
  teamId: number | null,
  ip: string,
): Promise<string> {
  const secret = newSecret();
  await db.insert(sessions).values({
    id: sha256Hex(secret),
    userId,
    teamId,
    ip,
    userAgent: (request.headers.get("User-Agent") ?? "").slice(0, 255),
    expiresAt: new Date(Date.now() + SESSION_MS),
  });
  return sessionCookie.serialize(secret, { secure: isSecureRequest(request) });
}

/** Deletes this request's session (if any) and returns a Set-Cookie header that clears it. */
export async function endSession(request: Request): Promise<string> {
  const current = await readSession(request);
  if (current) await db.delete(sessions).where(eq(sessions.id, current.id));
  return sessionCookie.serialize("", { maxAge: 0, secure: isSecureRequest(request) });
}

export function setSessionTeam(sessionId: string, teamId: number) {
  return db.update(sessions).set({ teamId }).where(eq(sessions.id, sessionId));
}

/** A user's live sessions, oldest first, for the account page. */
export function listSessions(userId: number) {
  return db
    .select({
      id: sessions.id,
      ip: sessions.ip,
      userAgent: sessions.userAgent,
      createdAt: sessions.createdAt,
      expiresAt: sessions.expiresAt,
    })
    .from(sessions)
    .where(and(eq(sessions.userId, userId), gt(sessions.expiresAt, new Date())))
    .orderBy(asc(sessions.createdAt));
}

/** Ends one of the user's sessions; true when there was one (another user's id matches nothing). */
export async function revokeSession(userId: number, sessionId: string): Promise<boolean> {
  const [result] = await db
    .delete(sessions)
    .where(and(eq(sessions.userId, userId), eq(sessions.id, sessionId)));
  return result.affectedRows > 0;
}

/** Ends every session of a user, except `keepId` when given. */
export function revokeAllSessions(userId: number, keepId?: string) {
  return db
    .delete(sessions)
    .where(
      keepId
        ? and(eq(sessions.userId, userId), ne(sessions.id, keepId))
        : eq(sessions.userId, userId),
    );
}
