import { and, asc, desc, eq, gt, isNull } from "drizzle-orm";
import type { SignoffApprovers } from "../domain/signoff";
import { invitations, memberships, teams, users, type Role } from "~/lib/infra/db/schema";
import { teamAuditChoices, teamAuditLog, type AuditFilter } from "./audit.server";
import { db } from "../infra/db.server";
import { NotFound } from "../domain/errors";
import { readChannelNames, type TeamIngestSettings } from "../domain/channel-names";
import type { ChannelName } from "../signal/types";

/** What a member row shows: the membership with its user. */
const memberColumns = {
  id: memberships.id,
  userId: users.id,
  email: users.email,
  name: users.name,
  role: memberships.role,
  joinedAt: memberships.createdAt,
};

/**
 * Every read and write of a team's rows goes through this object, which adds the team to each
 * query, so a route cannot forget the scope (docs/architecture.md §2). A record of another team is
 * reported as 404, exactly like a record that does not exist.
 */
export function teamData(teamId: number) {
  return {
    teamId,

    async team() {
      const [team] = await db
        .select({
          id: teams.id,
          name: teams.name,
          amplitudeUnit: teams.amplitudeUnit,
          trendReferenceRpm: teams.trendReferenceRpm,
          signoffApprovers: teams.signoffApprovers,
        })
        .from(teams)
        .where(eq(teams.id, teamId));
      if (!team) throw new NotFound("Team not found.");
      return team;
    },

    setAmplitudeUnit(unit: "rpm" | "rad/s") {
      return db.update(teams).set({ amplitudeUnit: unit }).where(eq(teams.id, teamId));
    },

    /** The engine speed the damper-health trend reads the isolation at (checked by the caller). */
    setTrendReferenceRpm(rpm: number) {
      return db.update(teams).set({ trendReferenceRpm: rpm }).where(eq(teams.id, teamId));
    },

    /** Who approves sign-offs besides never their proposer (domain/signoff.ts mayDecide). */
    setSignoffApprovers(approvers: SignoffApprovers) {
      return db.update(teams).set({ signoffApprovers: approvers }).where(eq(teams.id, teamId));
    },

    /** The team's channel names and strict flag, as every analysis job gets them. */
    async ingestSettings(): Promise<TeamIngestSettings> {
      const [row] = await db
        .select({ channelNames: teams.channelNames, strict: teams.strictIngest })
        .from(teams)
        .where(eq(teams.id, teamId));
      if (!row) throw new NotFound("Team not found.");
      return { channelNames: readChannelNames(row.channelNames), strict: row.strict };
    },

    /** Replaces the list (already checked with channelNamesSchema by the caller). */
    setChannelNames(list: ChannelName[]) {
      return db.update(teams).set({ channelNames: list }).where(eq(teams.id, teamId));
    },

    setStrictIngest(strict: boolean) {
      return db.update(teams).set({ strictIngest: strict }).where(eq(teams.id, teamId));
    },

    members() {
      return db
        .select(memberColumns)
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(eq(memberships.teamId, teamId))
        .orderBy(asc(users.name));
    },

    /** One member by membership id; 404 if it is not in this team. */
    async member(membershipId: number) {
      const [member] = await db
        .select(memberColumns)
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(and(eq(memberships.id, membershipId), eq(memberships.teamId, teamId)));
      if (!member) throw new NotFound("No such member in this team.");
      return member;
    },

    async adminCount() {
      const admins = await db
        .select({ id: memberships.id })
        .from(memberships)
        .where(and(eq(memberships.teamId, teamId), eq(memberships.role, "admin")));
      return admins.length;
    },

    setRole(membershipId: number, role: Role) {
      return db
        .update(memberships)
        .set({ role })
        .where(and(eq(memberships.id, membershipId), eq(memberships.teamId, teamId)));
    },

    removeMember(membershipId: number) {
      return db
        .delete(memberships)
        .where(and(eq(memberships.id, membershipId), eq(memberships.teamId, teamId)));
    },

    /** Invitations that can still be accepted. */
    openInvitations() {
      return db
        .select({
          id: invitations.id,
          email: invitations.email,
          role: invitations.role,
          expiresAt: invitations.expiresAt,
          createdAt: invitations.createdAt,
        })
        .from(invitations)
        .where(
          and(
            eq(invitations.teamId, teamId),
            isNull(invitations.acceptedAt),
            isNull(invitations.revokedAt),
            gt(invitations.expiresAt, new Date()),
          ),
        )
        .orderBy(desc(invitations.createdAt));
    },

    async revokeInvitation(invitationId: number) {
      const [result] = await db
        .update(invitations)
        .set({ revokedAt: new Date() })
        .where(
          and(
            eq(invitations.id, invitationId),
            eq(invitations.teamId, teamId),
            isNull(invitations.acceptedAt),
            isNull(invitations.revokedAt),
          ),
        );
      if (!(result.affectedRows > 0)) throw new NotFound("No such open invitation in this team.");
    },

    auditLog(limit = 200, filter: AuditFilter = {}) {
      return teamAuditLog(teamId, limit, filter);
    },

    auditChoices() {
      return teamAuditChoices(teamId);
    },
  };
}

export type TeamData = ReturnType<typeof teamData>;
