import { and, asc, eq, isNull } from "drizzle-orm";
import { users, type Role } from "~/lib/infra/db/schema";
import { comments } from "~/lib/infra/db/schema-results";
import type { CommentSubject, CommentView, CommentsResponse } from "../domain/comment-schema";
import { db } from "../infra/db.server";
import { sendMail } from "../infra/mail.server";
import { Forbidden, NotFound } from "../domain/errors";
import { canComment } from "../domain/roles";
import { teamData } from "./team-data.server";
import { vehicleData } from "./vehicles.server";

/**
 * Comments on a drive log or a comparison (issue 7), team-scoped like every other record.
 * Engineers, technicians and admins post (technicians often know what happened on the test
 * drive); viewers read. A comment may be pinned to a time (s) or an engine speed (rpm) inside
 * the subject's recording; `@name` mentions of team members send them an e-mail.
 */

export interface CommentCaller {
  userId: number;
  role: Role;
}

/** Tolerance beyond the recorded speed range, in engine-speed bins (half a bin either side). */
const RPM_MARGIN_BINS = 0.5;

export function commentData(teamId: number) {
  const vehicles = vehicleData(teamId);

  /** The subject's drive logs must be this team's and this vehicle's (404 otherwise). */
  async function checkSubject(vehicleId: number, subject: CommentSubject) {
    const vehicle = await vehicles.vehicle(vehicleId);
    const logs = [];
    for (const id of subject.logIds) {
      const log = await vehicles.log(id);
      if (log.vehicleId !== vehicle.id) throw new NotFound("No such drive log for this vehicle.");
      logs.push(log);
    }
    return { vehicle, logs };
  }

  /**
   * Where a pin may go: time from 0 to the longest recording, s; engine speed over the recorded
   * crank-speed range and the isolation bins, widened by half a bin, rpm. Null without analyses.
   */
  async function ranges(subject: CommentSubject): Promise<CommentsResponse["ranges"]> {
    let durationS = 0;
    let rpmMin = Infinity;
    let rpmMax = -Infinity;
    for (const id of subject.logIds) {
      const latest = await vehicles.latestAnalysis(id);
      if (!latest) continue;
      const r = latest.result;
      durationS = Math.max(durationS, r.durationS);
      const margin = r.settings.binRpm * RPM_MARGIN_BINS;
      const speeds = [...(r.speedTrace?.crankRpm ?? []), ...r.isolation.map((p) => p.rpm)];
      for (const s of speeds) {
        if (s === null) continue; // a null separates two sections of a split log
        rpmMin = Math.min(rpmMin, s - margin);
        rpmMax = Math.max(rpmMax, s + margin);
      }
    }
    if (durationS === 0 || !Number.isFinite(rpmMin)) return null;
    return {
      durationS: Math.round(durationS * 1000) / 1000,
      rpmMin: Math.max(0, Math.floor(rpmMin)),
      rpmMax: Math.ceil(rpmMax),
    };
  }

  return {
    checkSubject,
    ranges,

    async list(
      vehicleId: number,
      subject: CommentSubject,
      caller: CommentCaller,
    ): Promise<CommentsResponse> {
      await checkSubject(vehicleId, subject);
      const rows = await db
        .select({ c: comments, authorName: users.name })
        .from(comments)
        .leftJoin(users, eq(users.id, comments.authorId))
        .where(
          and(
            eq(comments.teamId, teamId),
            eq(comments.vehicleId, vehicleId),
            eq(comments.subjectKey, subject.key),
            isNull(comments.deletedAt),
          ),
        )
        .orderBy(asc(comments.createdAt), asc(comments.id));
      const list: CommentView[] = rows.map(({ c, authorName }) => ({
        id: c.id,
        body: c.body,
        author: { id: c.authorId, name: authorName ?? "a former member" },
        pinTimeS: c.pinTimeS,
        pinRpm: c.pinRpm,
        createdAt: c.createdAt.toISOString(),
        edited: c.edited === 1,
        canDelete: c.authorId === caller.userId || caller.role === "admin",
      }));
      return {
        subject: subject.key,
        comments: list,
        canPost: canComment(caller.role),
        ranges: await ranges(subject),
      };
    },

    /**
     * Checks a pin against the subject's recording: null when it fits, else the message for the
     * pin field.
     */
    async pinProblem(
      subject: CommentSubject,
      pin: { timeS?: number; rpm?: number },
    ): Promise<string | null> {
      if (pin.timeS === undefined && pin.rpm === undefined) return null;
      const r = await ranges(subject);
      if (!r) return "Pins need a finished analysis: post without a pin, or wait for the analysis.";
      if (pin.timeS !== undefined && (pin.timeS < 0 || pin.timeS > r.durationS))
        return `The recording is ${r.durationS.toFixed(1)} s long: pin to a time from 0 to ${r.durationS.toFixed(1)} s.`;
      if (pin.rpm !== undefined && (pin.rpm < r.rpmMin || pin.rpm > r.rpmMax))
        return `The recording covers ${r.rpmMin}–${r.rpmMax} rpm: pin to an engine speed in that range.`;
      return null;
    },

    async create(input: {
      vehicleId: number;
      subject: CommentSubject;
      author: CommentCaller;
      body: string;
      pin: { timeS?: number; rpm?: number };
    }): Promise<number> {
      await checkSubject(input.vehicleId, input.subject);
      const [row] = await db
        .insert(comments)
        .values({
          teamId,
          vehicleId: input.vehicleId,
          subjectKey: input.subject.key,
          authorId: input.author.userId,
          body: input.body,
          pinTimeS: input.pin.timeS ?? null,
          pinRpm: input.pin.rpm ?? null,
        })
        .$returningId();
      return row!.id;
    },

    /** Deletes (hides) a comment: its author's own, or any for an admin; 404 / 403 otherwise. */
    async remove(vehicleId: number, commentId: number, caller: CommentCaller) {
      const [row] = await db
        .select()
        .from(comments)
        .where(
          and(
            eq(comments.id, commentId),
            eq(comments.teamId, teamId),
            eq(comments.vehicleId, vehicleId),
            isNull(comments.deletedAt),
          ),
        );
      if (!row) throw new NotFound("No such comment.");
      if (!(row.authorId === caller.userId || caller.role === "admin"))
        throw new Forbidden("Only the author of a comment (or an admin) may delete it.");
      await db
        .update(comments)
        .set({ deletedAt: new Date() })
        .where(and(eq(comments.id, row.id), eq(comments.teamId, teamId)));
    },

    /**
     * E-mails the team members that `body` mentions (not the author): `@` followed by their
     * e-mail's local part, their name without spaces, or their first name when only one member
     * has it. Returns the names notified.
     */
    async notifyMentions(input: {
      body: string;
      author: { id: number; name: string };
      link: string;
      what: string;
    }): Promise<string[]> {
      const words = [...input.body.matchAll(/(?:^|[^\w@])@([A-Za-z0-9][\w.+-]*)/g)].map((m) =>
        m[1]!.replace(/[.\-+]+$/, "").toLowerCase(),
      );
      if (words.length === 0) return [];
      const members = await teamData(teamId).members();
      const firstNames = new Map<string, number>();
      for (const m of members) {
        const first = m.name.trim().split(/\s+/)[0]!.toLowerCase();
        firstNames.set(first, (firstNames.get(first) ?? 0) + 1);
      }
      const mentioned = members.filter((m) => {
        if (m.userId === input.author.id) return false;
        const local = m.email.split("@")[0]!.toLowerCase();
        const joined = m.name.replace(/\s+/g, "").toLowerCase();
        const first = m.name.trim().split(/\s+/)[0]!.toLowerCase();
        return words.some(
          (w) => w === local || w === joined || (w === first && firstNames.get(first) === 1),
        );
      });
      for (const m of mentioned) {
        await sendMail({
          kind: "mention",
          teamId,
          to: m.email,
          subject: `${input.author.name} mentioned you in a comment on Twistlog`,
          text: [
            `${input.author.name} mentioned you in a comment on ${input.what}:`,
            "",
            ...input.body.split("\n").map((l) => `> ${l}`),
            "",
            "Open it in Twistlog (sign in with your account):",
            input.link,
          ].join("\n"),
        });
      }
      return mentioned.map((m) => m.name);
    },
  };
}
