import { and, desc, eq, sql } from "drizzle-orm";
import { writeTransaction } from "../infra/db-errors.server";
import { users, type Role } from "~/lib/infra/db/schema";
import { shares, shareViews, type ShareKind } from "~/lib/infra/db/schema-results";
import { db } from "../infra/db.server";
import { Conflict, Forbidden, Invalid, NotFound } from "../domain/errors";
import { canManageShare } from "../domain/roles";
import { newSecret, sha256Hex } from "../infra/secrets.server";
import {
  SHARE_MAX_DAYS,
  type ShareState,
  type ShareSubject,
  type ShareSummary,
} from "../domain/share-schema";
import { signoffData } from "./signoffs.server";
import { vehicleData } from "./vehicles.server";

/**
 * Share links (issue 7, docs/decisions/007-share-links.md). A link carries a token of 32 random
 * bytes (256 bits, base64url, 43 characters; RFC 4086 §8 and NIST SP 800-63B §5.1.1.2 ask for
 * at least 128 bits for an unguessable secret); the database keeps only its sha256, so the token
 * is shown once and a copy of the database opens nothing. The token never goes into the audit
 * log or any log line: shares are named there by their id.
 */

const DAY_MS = 24 * 3600 * 1000;

/** What a caller is allowed to do with the team's share links. */
export interface ShareCaller {
  userId: number;
  role: Role;
}

export type ShareRow = typeof shares.$inferSelect;

export function shareState(
  share: Pick<ShareRow, "revokedAt" | "expiresAt">,
  now = new Date(),
): ShareState {
  if (share.revokedAt) return "revoked";
  return share.expiresAt <= now ? "expired" : "active";
}

/** The address of a share link's page. */
export function shareUrl(origin: string, token: string): string {
  return `${origin}/s/${token}`;
}

/** A well-formed token: 43 base64url characters (newSecret()). Anything else is not looked up. */
export function looksLikeShareToken(token: string | undefined): token is string {
  return typeof token === "string" && /^[A-Za-z0-9_-]{43}$/.test(token);
}

function expiryFromNow(days: number): Date {
  if (!(Number.isInteger(days) && days >= 1 && days <= SHARE_MAX_DAYS))
    throw new Invalid(`Choose a whole number of days from 1 to ${SHARE_MAX_DAYS}.`);
  return new Date(Date.now() + days * DAY_MS);
}

/**
 * Makes a share link for one drive log (kind "log"), a comparison of a vehicle's drive logs
 * (kind "comparison", 2–8 logs, in the order shown) or a sign-off (kind "signoff": its evidence
 * page and report only, never a raw file, so `allowRawDownload` is ignored). Every log and
 * sign-off must be the team's and the vehicle's (404 otherwise). Returns the token: this is the
 * only time it exists outside the caller's browser.
 */
export async function createShare(input: {
  teamId: number;
  caller: ShareCaller;
  subject:
    | { kind: "log"; logId: number }
    | { kind: "comparison"; vehicleId: number; logIds: number[] }
    | { kind: "signoff"; signoffId: number };
  expiresInDays: number;
  note: string;
  allowRawDownload: boolean;
}): Promise<{ id: number; token: string; expiresAt: Date; vehicleId: number; kind: ShareKind }> {
  const data = vehicleData(input.teamId);
  let vehicleId: number;
  let driveLogId: number | null = null;
  let signoffId: number | null = null;
  let logIds: number[];
  if (input.subject.kind === "signoff") {
    const signoff = await signoffData(input.teamId).get(input.subject.signoffId);
    vehicleId = signoff.vehicleId;
    signoffId = signoff.id;
    logIds = [];
  } else if (input.subject.kind === "log") {
    const log = await data.log(input.subject.logId);
    vehicleId = log.vehicleId;
    driveLogId = log.id;
    logIds = [log.id];
  } else {
    const vehicle = await data.vehicle(input.subject.vehicleId);
    logIds = [...new Set(input.subject.logIds)];
    if (!(logIds.length >= 2 && logIds.length <= 8))
      throw new Invalid("A comparison has 2 to 8 drive logs.");
    for (const id of logIds) {
      const log = await data.log(id);
      if (log.vehicleId !== vehicle.id)
        throw new NotFound(`Drive log ${id} is not one of this vehicle's.`);
    }
    vehicleId = vehicle.id;
  }
  const expiresAt = expiryFromNow(input.expiresInDays);
  const token = newSecret();
  const [row] = await db
    .insert(shares)
    .values({
      teamId: input.teamId,
      vehicleId,
      kind: input.subject.kind,
      driveLogId,
      signoffId,
      logIds,
      tokenHash: sha256Hex(token),
      note: input.note.slice(0, 500),
      allowRawDownload: input.subject.kind !== "signoff" && input.allowRawDownload,
      createdBy: input.caller.userId,
      expiresAt,
    })
    .$returningId();
  return { id: row!.id, token, expiresAt, vehicleId, kind: input.subject.kind };
}

const listColumns = {
  share: shares,
  creatorName: users.name,
};

function summary(
  row: { share: ShareRow; creatorName: string | null },
  caller: ShareCaller,
  now: Date,
): ShareSummary {
  const s = row.share;
  return {
    id: s.id,
    kind: s.kind,
    vehicleId: s.vehicleId,
    logId: s.driveLogId,
    logIds: s.logIds,
    signoffId: s.signoffId,
    note: s.note,
    allowRawDownload: s.allowRawDownload,
    createdBy: { id: s.createdBy, name: row.creatorName ?? "a former member" },
    createdAt: s.createdAt.toISOString(),
    expiresAt: s.expiresAt.toISOString(),
    revokedAt: s.revokedAt?.toISOString() ?? null,
    state: shareState(s, now),
    viewCount: s.viewCount,
    lastViewedAt: s.lastViewedAt?.toISOString() ?? null,
    canManage: canManageShare(caller, s),
  };
}

/**
 * The team's share links, newest first, with their sharer's name, views and state. Engineers
 * and admins see all of the team's links (so nobody shares the same thing twice unknowingly);
 * `canManage` says which ones the caller may extend or revoke.
 */
export async function listShares(
  teamId: number,
  caller: ShareCaller,
  filter: { logId?: number; vehicleId?: number; signoffId?: number } = {},
): Promise<ShareSummary[]> {
  const rows = await db
    .select(listColumns)
    .from(shares)
    .leftJoin(users, eq(users.id, shares.createdBy))
    .where(
      and(
        eq(shares.teamId, teamId),
        filter.logId ? eq(shares.driveLogId, filter.logId) : undefined,
        filter.vehicleId ? eq(shares.vehicleId, filter.vehicleId) : undefined,
        filter.signoffId ? eq(shares.signoffId, filter.signoffId) : undefined,
      ),
    )
    .orderBy(desc(shares.createdAt), desc(shares.id))
    .limit(500);
  const now = new Date();
  return rows.map((r) => summary(r, caller, now));
}

/**
 * The share links of one subject (the share panel's list), newest first. A comparison is its
 * set of drive logs: the same logs in another order are the same comparison.
 */
export async function sharesOfSubject(
  teamId: number,
  caller: ShareCaller,
  subject: ShareSubject,
): Promise<ShareSummary[]> {
  if (subject.kind === "log") return listShares(teamId, caller, { logId: subject.logId });
  if (subject.kind === "signoff")
    return listShares(teamId, caller, { signoffId: subject.signoffId });
  const setOf = (ids: number[]) => [...ids].sort((a, b) => a - b).join(",");
  const key = setOf(subject.logIds);
  return (await listShares(teamId, caller, { vehicleId: subject.vehicleId })).filter(
    (s) => s.kind === "comparison" && setOf(s.logIds) === key,
  );
}

/** One of the team's share links (404 for another team's or none). */
export async function getShare(
  teamId: number,
  caller: ShareCaller,
  shareId: number,
): Promise<ShareSummary> {
  const [row] = await db
    .select(listColumns)
    .from(shares)
    .leftJoin(users, eq(users.id, shares.createdBy))
    .where(and(eq(shares.id, shareId), eq(shares.teamId, teamId)));
  if (!row) throw new NotFound("No such share link in this team.");
  return summary(row, caller, new Date());
}

/** The team's share link that the caller may manage: 404 if not the team's, 403 if not theirs. */
async function manageable(teamId: number, caller: ShareCaller, shareId: number): Promise<ShareRow> {
  const [row] = await db
    .select()
    .from(shares)
    .where(and(eq(shares.id, shareId), eq(shares.teamId, teamId)));
  if (!row) throw new NotFound("No such share link in this team.");
  if (!canManageShare(caller, row))
    throw new Forbidden("Only the person who made this share link, or an admin, may change it.");
  return row;
}

/**
 * Sets a link to expire `days` from now (1–90). An expired link works again; a revoked one
 * stays revoked (409), since revoking is the sharer's way of saying "never again".
 */
export async function extendShare(
  teamId: number,
  caller: ShareCaller,
  shareId: number,
  days: number,
): Promise<ShareSummary> {
  const row = await manageable(teamId, caller, shareId);
  if (row.revokedAt) throw new Conflict("This share link is revoked; make a new one instead.");
  const expiresAt = expiryFromNow(days);
  await db
    .update(shares)
    .set({ expiresAt })
    .where(and(eq(shares.id, row.id), eq(shares.teamId, teamId)));
  return getShare(teamId, caller, row.id);
}

/** Revokes a link (idempotent: revoking a revoked link changes nothing). */
export async function revokeShare(
  teamId: number,
  caller: ShareCaller,
  shareId: number,
): Promise<ShareSummary> {
  const row = await manageable(teamId, caller, shareId);
  if (!row.revokedAt) {
    await db
      .update(shares)
      .set({ revokedAt: new Date() })
      .where(and(eq(shares.id, row.id), eq(shares.teamId, teamId)));
  }
  return getShare(teamId, caller, row.id);
}

export type ResolvedShare =
  | { status: "ok"; share: ShareRow; teamId: number; sharedBy: string }
  | { status: "unavailable"; reason: "expired" | "revoked" }
  | { status: "not-found" };

/**
 * The share behind a token. A malformed, altered or unknown token is "not-found" (404: there is
 * no such link); a revoked or expired one is "unavailable" (410: it existed and is gone for good,
 * RFC 9110 §15.5.11), and carries nothing of the shared data.
 */
export async function resolveShare(token: string | undefined): Promise<ResolvedShare> {
  if (!looksLikeShareToken(token)) return { status: "not-found" };
  const [row] = await db
    .select({ share: shares, sharedBy: users.name })
    .from(shares)
    .leftJoin(users, eq(users.id, shares.createdBy))
    .where(eq(shares.tokenHash, sha256Hex(token)));
  if (!row) return { status: "not-found" };
  const state = shareState(row.share);
  if (state !== "active") return { status: "unavailable", reason: state };
  return {
    status: "ok",
    share: row.share,
    teamId: row.share.teamId,
    sharedBy: row.sharedBy ?? "a former member of the team",
  };
}

/** One opening of a share link: a row with the time only, and the link's counter. */
export async function countShareView(shareId: number): Promise<void> {
  // The share's row first: its exclusive lock queues concurrent views of one link. Inserting the
  // view first took a shared lock on the share (the foreign key check), and two views that both
  // held it and then wanted to update the count deadlocked (MariaDB error 1213: a 500).
  await writeTransaction(db, async (tx) => {
    await tx
      .update(shares)
      .set({ viewCount: sql`${shares.viewCount} + 1`, lastViewedAt: new Date() })
      .where(eq(shares.id, shareId));
    await tx.insert(shareViews).values({ shareId });
  });
}

/**
 * The drive-log ids a share link opens: its one log, or the comparison's logs. A sign-off's link
 * opens none: its page shows the frozen evidence and the report, no drive log's charts or file.
 */
export function sharedLogIds(share: Pick<ShareRow, "kind" | "driveLogId" | "logIds">): number[] {
  if (share.kind === "signoff") return [];
  return share.kind === "log" ? (share.driveLogId ? [share.driveLogId] : []) : share.logIds;
}

/** The audit log's actor for an API caller (an API token's access has the id only). */
export async function auditActor(userId: number): Promise<{ id: number; email: string }> {
  const [row] = await db.select({ email: users.email }).from(users).where(eq(users.id, userId));
  return { id: userId, email: row?.email ?? "" };
}
