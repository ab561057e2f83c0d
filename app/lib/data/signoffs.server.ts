/**
 * Every read and write of a team's sign-offs (docs/signoff.md). Another team's sign-off is a 404
 * like one that does not exist. The rules are in domain/signoff.ts, the evidence in
 * ./signoff-evidence.server.ts, the report in ./signoff-report.server.ts; this module keeps the
 * states and the history, audits every step and sends the mail. Superseding is in
 * analyses/signoff-supersede.server.ts (it runs inside the changes that cause it).
 */
import { Readable } from "node:stream";
import { writeTransaction } from "../infra/db-errors.server";
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import { users } from "~/lib/infra/db/schema";
import { analyses, driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { signoffResults, signoffSteps, signoffs } from "~/lib/infra/db/schema-signoffs";
import { db } from "../infra/db.server";
import { blobStore } from "../infra/storage-settings.server";
import { Conflict, Forbidden, Invalid, NotFound } from "../domain/errors";
import type { Role } from "../domain/roles";
import {
  mayDecide,
  mayPropose,
  SIGNOFF_NEXT,
  type ClaimCheck,
  type RecordPerson,
  type SignoffInput,
  type SignoffJson,
  type SignoffRecord,
  type SignoffState,
} from "../domain/signoff";
import { audit, type AuditAction } from "./audit.server";
import {
  blockedMessage,
  canonicalText,
  gatherEvidence,
  recordOf,
  sha256Hex,
} from "./signoff-evidence.server";
import { renderSignoffReport } from "./signoff-report.server";
import { mailApprovers, mailProposer } from "./signoff-mail.server";
import { teamData } from "./team-data.server";
import { vehicleData } from "./vehicles.server";

export { supersedeSignoffs } from "../analyses/signoff-supersede.server";

/** Who is acting, as requireAccess gives it, plus where from (audit) and the site (mail links). */
export interface SignoffCaller {
  userId: number;
  role: Role;
  ip: string;
  /** The site's origin for links in mail, e.g. http://127.0.0.1:3000; none: no link. */
  origin?: string;
}

/** One damper variant's line on the vehicle page's Sign-off card. */
export interface VariantSignoff {
  damperVariant: string;
  /** Finished drive logs of this variant. */
  logs: number;
  /** The newest sign-off of the variant, if any (any state), and the newest approved one. */
  latest: SignoffJson | null;
  approved: SignoffJson | null;
}

type SignoffRow = typeof signoffs.$inferSelect;

const iso = (d: Date | null) => (d ? d.toISOString() : null);

async function person(userId: number): Promise<RecordPerson> {
  const [u] = await db
    .select({ name: users.name, email: users.email })
    .from(users)
    .where(eq(users.id, userId));
  return { id: userId, name: u?.name ?? "a former member", email: u?.email ?? "" };
}

export function signoffData(teamId: number) {
  const inTeam = eq(signoffs.teamId, teamId);

  async function row(id: number): Promise<SignoffRow> {
    const [found] = await db
      .select()
      .from(signoffs)
      .where(and(eq(signoffs.id, id), inTeam));
    if (!found) throw new NotFound("No such sign-off in this team.");
    return found;
  }

  /** The API's view of rows, with their people and history in two more queries. */
  async function toJson(rows: SignoffRow[]): Promise<SignoffJson[]> {
    if (rows.length === 0) return [];
    const ids = rows.map((r) => r.id);
    const steps = await db
      .select()
      .from(signoffSteps)
      .where(inArray(signoffSteps.signoffId, ids))
      .orderBy(asc(signoffSteps.id));
    const people = new Set(rows.flatMap((r) => [r.proposedBy, r.decidedBy]));
    const known = [...people].filter((p): p is number => p !== null);
    const names = known.length
      ? await db
          .select({ id: users.id, name: users.name, email: users.email })
          .from(users)
          .where(inArray(users.id, known))
      : [];
    const who = (userId: number | null, fallback: RecordPerson | null): RecordPerson | null => {
      const u = names.find((n) => n.id === userId);
      return u ? { id: u.id, name: u.name, email: u.email } : fallback;
    };
    return rows.map((r) => {
      const own = steps.filter((s) => s.signoffId === r.id);
      const proposed = own.find((s) => s.step === "proposed");
      const decided = own.find((s) => s.step === "approved" || s.step === "rejected");
      return {
        id: r.id,
        vehicleId: r.vehicleId,
        damperVariant: r.damperVariant,
        state: r.state,
        note: r.note,
        claims: r.claims,
        deviations: r.deviations,
        proposedBy: who(r.proposedBy, {
          id: null,
          name: proposed?.actorName ?? "a former member",
          email: proposed?.actorEmail ?? "",
        })!,
        proposedAt: r.proposedAt.toISOString(),
        decidedBy: r.decidedAt
          ? who(r.decidedBy, {
              id: null,
              name: decided?.actorName ?? "a former member",
              email: decided?.actorEmail ?? "",
            })
          : null,
        decidedAt: iso(r.decidedAt),
        decisionComment: r.decisionComment,
        digest: r.digest,
        reportSha256: r.reportSha256,
        closedAt: iso(r.closedAt),
        closedReason: r.closedReason,
        history: own.map((s) => ({
          step: s.step,
          by: s.actorName,
          at: s.at.toISOString(),
          text: s.text,
        })),
      };
    });
  }

  async function get(id: number): Promise<SignoffJson> {
    return (await toJson([await row(id)]))[0]!;
  }

  async function record(id: number): Promise<{ text: string; record: SignoffRecord }> {
    const r = await row(id);
    const text = r.record.toString("utf8");
    return { text, record: JSON.parse(text) as SignoffRecord };
  }

  /** A step: the row's new columns and its history line, only from an allowed state. */
  async function step(
    id: number,
    to: Exclude<SignoffState, "proposed">,
    caller: SignoffCaller,
    text: string,
    columns: Partial<SignoffRow>,
    expect?: { record: Buffer },
  ): Promise<SignoffRow> {
    const actor = await person(caller.userId);
    const done = await writeTransaction(db, async (tx) => {
      const [current] = await tx
        .select()
        .from(signoffs)
        .where(and(eq(signoffs.id, id), inTeam))
        .for("update");
      if (!current) throw new NotFound("No such sign-off in this team.");
      if (!SIGNOFF_NEXT[current.state].includes(to))
        throw new Conflict(
          `This sign-off is ${current.state}; it can no longer be ${to === "approved" ? "approved" : to}.`,
        );
      if (expect && !current.record.equals(expect.record))
        throw new Conflict("The sign-off changed while it was being approved; try again.");
      await tx
        .update(signoffs)
        .set({ ...columns, state: to })
        .where(eq(signoffs.id, id));
      await tx.insert(signoffSteps).values({
        signoffId: id,
        step: to,
        actorUserId: caller.userId,
        actorName: actor.name,
        actorEmail: actor.email,
        text: text.slice(0, 4000),
      });
      return { ...current, ...columns, state: to };
    });
    const action: AuditAction = `signoff-${to}`;
    await audit({
      teamId,
      actor: { id: caller.userId, email: actor.email },
      action,
      detail: `sign-off ${id} (variant ${done.damperVariant})${text ? `: ${text}` : ""}`,
      ip: caller.ip,
    });
    return done;
  }

  /** Checks who decides: the team's setting and never the proposer. */
  async function decider(r: SignoffRow, caller: SignoffCaller): Promise<void> {
    const { signoffApprovers } = await teamData(teamId).team();
    const refusal = mayDecide({
      approvers: signoffApprovers,
      caller,
      proposedBy: r.proposedBy,
    });
    if (refusal) throw new Forbidden(refusal);
  }

  return {
    teamId,
    get,
    record,

    /** Newest first; only the vehicle's when given (404 for another team's vehicle). */
    async list(filter: { vehicleId?: number } = {}): Promise<SignoffJson[]> {
      if (filter.vehicleId !== undefined) await vehicleData(teamId).vehicle(filter.vehicleId);
      const rows = await db
        .select()
        .from(signoffs)
        .where(
          and(
            inTeam,
            filter.vehicleId !== undefined ? eq(signoffs.vehicleId, filter.vehicleId) : undefined,
          ),
        )
        .orderBy(desc(signoffs.proposedAt), desc(signoffs.id));
      return toJson(rows);
    },

    /** The claim check a proposal would get now (the form shows it before sending). */
    async check(
      vehicleId: number,
      input: SignoffInput,
    ): Promise<{ checks: ClaimCheck[]; problems: string[]; blocked: boolean }> {
      const { checks, problems, blocked } = await gatherEvidence(teamId, vehicleId, input);
      return { checks, problems, blocked };
    },

    /**
     * Proposes: Invalid (400) when blocked, listing every problem and blocking claim; Forbidden
     * below engineer; Conflict when a claimed drive log got a new analysis meanwhile. Freezes
     * the evidence (the record and a copy of each result), audits, mails the possible approvers
     * (not with `notify: false`: fixtures and seeds made outside a running server).
     */
    async propose(
      vehicleId: number,
      input: SignoffInput,
      caller: SignoffCaller,
      options: { notify?: boolean } = {},
    ): Promise<SignoffJson> {
      if (!mayPropose(caller.role))
        throw new Forbidden("Only engineers and admins propose sign-offs.");
      const evidence = await gatherEvidence(teamId, vehicleId, input);
      if (evidence.blocked) throw new Invalid(blockedMessage(evidence), "signoff_blocked");
      const team = await teamData(teamId).team();
      const proposer = await person(caller.userId);
      const id = await writeTransaction(db, async (tx) => {
        // The analyses the verdicts came from must still be the drive logs' latest.
        const logIds = evidence.logs.map((l) => l.row.id);
        const now = await tx
          .select({ id: driveLogs.id, latest: driveLogs.latestAnalysisId })
          .from(driveLogs)
          .where(and(eq(driveLogs.teamId, teamId), inArray(driveLogs.id, logIds)))
          .for("update");
        for (const l of evidence.logs) {
          if (now.find((n) => n.id === l.row.id)?.latest !== l.analysis.id)
            throw new Conflict(
              `Drive log "${l.row.fileName}" changed while the sign-off was being proposed; check the claims again.`,
            );
        }
        const results = await tx
          .select({ id: analyses.id, resultGz: analyses.resultGz })
          .from(analyses)
          .where(
            and(
              eq(analyses.teamId, teamId),
              inArray(
                analyses.id,
                evidence.logs.map((l) => l.analysis.id),
              ),
            ),
          );
        const resultGz = new Map(results.map((r) => [r.id, r.resultGz]));
        const proposedAt = new Date();
        const [inserted] = await tx
          .insert(signoffs)
          .values({
            teamId,
            vehicleId: evidence.vehicle.id,
            damperVariant: input.damperVariant,
            claims: input.claims,
            deviations: input.deviations ?? [],
            note: input.note,
            record: Buffer.from(""),
            proposedBy: caller.userId,
            proposedAt,
          })
          .$returningId();
        const signoffId = inserted!.id;
        const rec = recordOf({
          signoffId,
          team: { id: team.id, name: team.name },
          evidence,
          damperVariant: input.damperVariant,
          note: input.note,
          resultGz,
          proposedBy: proposer,
          proposedAt,
        });
        await tx
          .update(signoffs)
          .set({ record: Buffer.from(canonicalText(rec), "utf8") })
          .where(eq(signoffs.id, signoffId));
        await tx.insert(signoffResults).values(
          evidence.logs.map((l) => ({
            signoffId,
            driveLogId: l.row.id,
            analysisId: l.analysis.id,
            blobKey: l.row.blobKey,
            resultGz: resultGz.get(l.analysis.id)!,
          })),
        );
        await tx.insert(signoffSteps).values({
          signoffId,
          step: "proposed",
          actorUserId: caller.userId,
          actorName: proposer.name,
          actorEmail: proposer.email,
          text: input.note.slice(0, 4000),
          at: proposedAt,
        });
        return signoffId;
      });
      await audit({
        teamId,
        actor: { id: caller.userId, email: proposer.email },
        action: "signoff-proposed",
        detail: `sign-off ${id} of ${evidence.vehicle.identifier}, variant ${input.damperVariant}: ${evidence.checks.length} targets`,
        ip: caller.ip,
      });
      const made = await get(id);
      if (options.notify !== false)
        await mailApprovers(teamId, made, evidence.vehicle.identifier, proposer, caller);
      return made;
    },

    /**
     * Approves a proposal: Forbidden for its proposer and per the team's approvers setting;
     * Conflict (409) unless proposed. Adds the approval to the record, stores the digest and the
     * evidence report's PDF, audits and mails the proposer.
     */
    async approve(id: number, comment: string, caller: SignoffCaller): Promise<SignoffJson> {
      const r = await row(id);
      await decider(r, caller);
      if (r.state !== "proposed")
        throw new Conflict(`This sign-off is ${r.state}; only a proposal can be approved.`);
      const approver = await person(caller.userId);
      const at = new Date();
      const proposed = JSON.parse(r.record.toString("utf8")) as SignoffRecord;
      const approved: SignoffRecord = {
        ...proposed,
        approval: { by: approver, at: at.toISOString(), comment },
      };
      const text = canonicalText(approved);
      const pdf = await renderSignoffReport(teamId, {
        record: approved,
        state: "approved",
        steps: [
          ...(await get(id)).history,
          { step: "approved", by: approver.name, at: at.toISOString(), text: comment },
        ],
        digest: sha256Hex(text),
        generatedAt: at,
        signoffId: id,
      });
      const stored = await blobStore().put(Readable.from([pdf]));
      await step(
        id,
        "approved",
        caller,
        comment,
        {
          record: Buffer.from(text, "utf8"),
          digest: sha256Hex(text),
          reportSha256: stored.key,
          decidedBy: caller.userId,
          decidedAt: at,
          decisionComment: comment,
        },
        { record: r.record },
      );
      const made = await get(id);
      await mailProposer(teamId, made, "approved", approver, caller);
      return made;
    },

    async reject(id: number, comment: string, caller: SignoffCaller): Promise<SignoffJson> {
      const r = await row(id);
      await decider(r, caller);
      const by = await person(caller.userId);
      await step(id, "rejected", caller, comment, {
        decidedBy: caller.userId,
        decidedAt: new Date(),
        decisionComment: comment,
      });
      const made = await get(id);
      await mailProposer(teamId, made, "rejected", by, caller);
      return made;
    },

    /** Withdraws a proposed or approved sign-off (engineer or admin): a step, never a deletion. */
    async withdraw(id: number, reason: string, caller: SignoffCaller): Promise<SignoffJson> {
      if (!mayPropose(caller.role))
        throw new Forbidden("Only engineers and admins withdraw sign-offs.");
      await row(id);
      await step(id, "withdrawn", caller, reason, {
        closedAt: new Date(),
        closedReason: reason,
        closedBy: caller.userId,
      });
      return get(id);
    },

    /**
     * The evidence report: an approved sign-off's stored PDF, byte for byte, whatever happened
     * to it since (superseded, withdrawn); otherwise a draft rendered now from the frozen record.
     */
    async report(id: number): Promise<{ pdf: Buffer; fileName: string; stored: boolean }> {
      const r = await row(id);
      const { record: rec } = await record(id);
      const fileName =
        `${rec.vehicle.identifier}-${r.damperVariant}-signoff-${r.id}${r.reportSha256 ? "" : "-draft"}.pdf`.replace(
          /[^A-Za-z0-9._-]+/g,
          "_",
        );
      if (r.reportSha256) {
        const chunks: Buffer[] = [];
        for await (const chunk of blobStore().read(r.reportSha256)) chunks.push(chunk as Buffer);
        return { pdf: Buffer.concat(chunks), fileName, stored: true };
      }
      const json = await get(id);
      const pdf = await renderSignoffReport(teamId, {
        record: rec,
        state: r.state,
        steps: json.history,
        digest: null,
        generatedAt: new Date(),
        signoffId: id,
      });
      return { pdf, fileName, stored: false };
    },

    /** The Sign-off card: one line per damper variant of the vehicle's drive logs and sign-offs. */
    async variants(vehicleId: number): Promise<VariantSignoff[]> {
      const vehicle = await vehicleData(teamId).vehicle(vehicleId);
      const logs = await db
        .select({ variant: driveLogs.damperVariant, analysed: driveLogs.latestAnalysisId })
        .from(driveLogs)
        .where(and(eq(driveLogs.teamId, teamId), eq(driveLogs.vehicleId, vehicle.id)));
      const all = await this.list({ vehicleId: vehicle.id });
      const names = [
        ...new Set([
          vehicle.damperVariant,
          ...logs.map((l) => l.variant),
          ...all.map((s) => s.damperVariant),
        ]),
      ].sort((a, b) => a.localeCompare(b));
      return names.map((damperVariant) => {
        const own = all.filter((s) => s.damperVariant === damperVariant);
        return {
          damperVariant,
          logs: logs.filter((l) => l.variant === damperVariant && l.analysed !== null).length,
          latest: own[0] ?? null,
          approved: own.find((s) => s.state === "approved") ?? null,
        };
      });
    },
  };
}

export type { SignoffState };
