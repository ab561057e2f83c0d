import { and, asc, desc, eq, gte, inArray, isNull, lt, or } from "drizzle-orm";
import { auditEvents, memberships } from "~/lib/infra/db/schema";
import { db } from "../infra/db.server";

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
  | "share-emailed"
  // Drive logs deleted (issue 16), named by id, file and vehicle.
  | "drive-log-deleted"
  // Every drive log of a vehicle re-analysed at once (issue 17), named by vehicle and batch.
  | "vehicle-reanalysed"
  // Sign-offs (issue 16): every step, named by sign-off id and damper variant.
  | "signoff-proposed"
  | "signoff-approved"
  | "signoff-rejected"
  | "signoff-withdrawn"
  | "signoff-superseded";

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

/** What the audit log page may narrow the log to; every part is optional (team.audit.tsx). */
export interface AuditFilter {
  action?: AuditAction;
  actorEmail?: string;
  /** Inclusive start and exclusive end, UTC. */
  from?: Date;
  before?: Date;
}

/** The team's events and the personal events (sign-ins) of its current members. */
function inTeamLog(teamId: number) {
  const members = db
    .select({ userId: memberships.userId })
    .from(memberships)
    .where(eq(memberships.teamId, teamId));
  return or(
    eq(auditEvents.teamId, teamId),
    and(isNull(auditEvents.teamId), inArray(auditEvents.actorUserId, members)),
  );
}

/**
 * The team's log, newest first, narrowed by `filter`. Only the team-scoped data layer calls
 * this (team-data.server.ts).
 */
export function teamAuditLog(teamId: number, limit: number, filter: AuditFilter = {}) {
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
      and(
        inTeamLog(teamId),
        filter.action ? eq(auditEvents.action, filter.action) : undefined,
        filter.actorEmail ? eq(auditEvents.actorEmail, filter.actorEmail) : undefined,
        filter.from ? gte(auditEvents.createdAt, filter.from) : undefined,
        filter.before ? lt(auditEvents.createdAt, filter.before) : undefined,
      ),
    )
    .orderBy(desc(auditEvents.createdAt), desc(auditEvents.id))
    .limit(limit);
}

/**
 * What the filters offer: the people (by e-mail) and the actions that appear in the team's log,
 * so a filter never names something that cannot match.
 */
export async function teamAuditChoices(teamId: number) {
  const [people, actions] = await Promise.all([
    db
      .selectDistinct({ value: auditEvents.actorEmail })
      .from(auditEvents)
      .where(inTeamLog(teamId))
      .orderBy(asc(auditEvents.actorEmail)),
    db.selectDistinct({ value: auditEvents.action }).from(auditEvents).where(inTeamLog(teamId)),
  ]);
  return { people: people.map((r) => r.value), actions: actions.map((r) => r.value) };
}
