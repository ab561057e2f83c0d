import { and, desc, eq, inArray, isNull, or } from "drizzle-orm";
import { auditEvents, memberships } from "~/db/schema";
import { db } from "./db.server";

/** What the audit log records (issue 3: sign-ins, failures, roles, invitations, tokens, …). */
export type AuditAction =
  | "sign-in"
  | "sign-in-failed"
  | "sign-in-throttled"
  | "sign-out"
  | "session-revoked"
  | "password-reset-requested"
  | "password-reset"
  | "invitation-sent"
  | "invitation-revoked"
  | "invitation-accepted"
  | "role-changed"
  | "member-removed"
  | "team-settings-changed"
  | "token-created"
  | "token-revoked"
  // Vehicles: added, changed, archived and restored (named by identifier).
  | "vehicle-created"
  | "vehicle-changed"
  | "vehicle-archived"
  | "vehicle-restored"
  // Targets of a vehicle (issue 6): named by id, vehicle and what they limit.
  | "target-created"
  | "target-changed"
  | "target-deleted"
  // Share links (issue 7): named by their id, never by their token.
  | "share-created"
  | "share-extended"
  | "share-revoked"
  | "share-emailed";

export interface AuditEntry {
  /** null for a person's own events (sign-ins); admins of the person's teams see those. */
  teamId: number | null;
  actor: { id: number | null; email: string };
  action: AuditAction;
  detail?: string;
  ip: string;
}

export async function audit(entry: AuditEntry): Promise<void> {
  await db.insert(auditEvents).values({
    teamId: entry.teamId,
    actorUserId: entry.actor.id,
    actorEmail: entry.actor.email.slice(0, 254),
    action: entry.action,
    detail: (entry.detail ?? "").slice(0, 500),
    ip: entry.ip,
  });
}

/**
 * The team's log, newest first: its own events and the personal events (sign-ins) of its
 * current members. Only the team-scoped data layer calls this (team-data.server.ts).
 */
export function teamAuditLog(teamId: number, limit: number) {
  const members = db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(eq(memberships.teamId, teamId));
  return db
    .select({
      id: auditEvents.id,
      actorEmail: auditEvents.actorEmail,
      action: auditEvents.action,
      detail: auditEvents.detail,
      ip: auditEvents.ip,
      createdAt: auditEvents.createdAt,
    })
    .from(auditEvents)
    .where(
      or(
        eq(auditEvents.teamId, teamId),
        and(isNull(auditEvents.teamId), inArray(auditEvents.actorUserId, members)),
      ),
    )
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(limit);
}
