/**
 * Sign-off (docs/signoff.md): an engineer claims that a vehicle's damper variant meets named
 * targets, each proven by named drive logs; a second person approves or rejects the claim. The
 * rules here are pure and shared by the server, the forms and the pages:
 *
 * - a claim holds when every drive log named for it passes the target (checkClaims); a claim that
 *   fails or is not covered blocks the proposal unless a deviation with a reason is recorded;
 * - the four-eyes rule: the proposer never decides; the team chooses whether any engineer or
 *   admin, or only an admin, decides (mayDecide);
 * - the states and which step leads where (SIGNOFF_NEXT).
 *
 * A product rule of Twistlog (common practice of release processes: four eyes, frozen evidence),
 * not a standard.
 */
import { z } from "zod";
import { canSignOff, type Role } from "./roles";
import type { LogCondition } from "./drive-log-terms";
import type { Target, TargetStatus, TargetVerdict } from "./targets";

export const SIGNOFF_STATES = [
  "proposed",
  "approved",
  "rejected",
  "superseded",
  "withdrawn",
] as const;
export type SignoffState = (typeof SIGNOFF_STATES)[number];

/** What a history step records; the first is always "proposed". */
export const SIGNOFF_STEPS = SIGNOFF_STATES;
export type SignoffStep = SignoffState;

/** Who may decide on a sign-off besides never its proposer (a team setting). */
export const SIGNOFF_APPROVERS = ["engineers", "admins"] as const;
export type SignoffApprovers = (typeof SIGNOFF_APPROVERS)[number];

export const signoffStateLabels: Record<SignoffState, string> = {
  proposed: "Awaiting approval",
  approved: "Approved",
  rejected: "Rejected",
  superseded: "Superseded",
  withdrawn: "Withdrawn",
};

/** The steps each state allows: only a proposal is decided; what is open can be closed. */
export const SIGNOFF_NEXT: Record<SignoffState, readonly SignoffStep[]> = {
  proposed: ["approved", "rejected", "superseded", "withdrawn"],
  approved: ["superseded", "withdrawn"],
  rejected: [],
  superseded: [],
  withdrawn: [],
};

/** States whose evidence is still current: a later change of it supersedes them. */
export const OPEN_STATES = ["proposed", "approved"] as const satisfies readonly SignoffState[];

export const MAX_CLAIMS = 40;
export const MAX_LOGS_PER_CLAIM = 50;

const id = z.coerce
  .number({ error: "An id is a positive whole number." })
  .int("An id is a positive whole number.")
  .positive("An id is a positive whole number.");

export const signoffClaimSchema = z.object({
  targetId: id,
  logIds: z
    .array(id)
    .min(1, "Name at least one drive log that proves the target.")
    .max(MAX_LOGS_PER_CLAIM, `At most ${MAX_LOGS_PER_CLAIM} drive logs per target.`),
});
export type SignoffClaimInput = z.infer<typeof signoffClaimSchema>;

export const signoffDeviationSchema = z.object({
  targetId: id,
  reason: z
    .string()
    .trim()
    .min(10, "Say in at least 10 characters why the deviation is accepted.")
    .max(1000, "A deviation's reason is at most 1000 characters."),
});
export type SignoffDeviation = z.infer<typeof signoffDeviationSchema>;

/** POST /api/v1/vehicles/:id/signoffs and the proposal form (after the form's own parsing). */
export const signoffInputSchema = z.object({
  damperVariant: z
    .string({ error: "Name the damper variant." })
    .trim()
    .min(1, "Name the damper variant.")
    .max(80, "A damper variant is at most 80 characters."),
  claims: z
    .array(signoffClaimSchema)
    .min(1, "Claim at least one target.")
    .max(MAX_CLAIMS, `At most ${MAX_CLAIMS} targets per sign-off.`),
  note: z.string().trim().max(4000, "The note is at most 4000 characters.").default(""),
  deviations: z.array(signoffDeviationSchema).max(MAX_CLAIMS).optional(),
});
export type SignoffInput = z.infer<typeof signoffInputSchema>;

/** Approve: the comment is optional. */
export const approveSchema = z.object({
  comment: z.string().trim().max(2000, "The comment is at most 2000 characters.").default(""),
});
/** Reject: say why. */
export const rejectSchema = z.object({
  comment: z
    .string({ error: "Say why the sign-off is rejected." })
    .trim()
    .min(1, "Say why the sign-off is rejected.")
    .max(2000, "The comment is at most 2000 characters."),
});
export const withdrawSchema = z.object({
  reason: z
    .string({ error: "Say why the sign-off is withdrawn." })
    .trim()
    .min(1, "Say why the sign-off is withdrawn.")
    .max(1000, "The reason is at most 1000 characters."),
});

// ---------------------------------------------------------------------------------------------
// The claim check

/** One claimed drive log's verdict for the claimed target. */
export interface ClaimLogVerdict {
  logId: number;
  fileName: string;
  status: TargetStatus;
  value: number | null;
  margin: number | null;
  atRpm: number | null;
  detail: string;
}

export type ClaimStatus = "pass" | "fail" | "not-covered";

export interface ClaimCheck {
  targetId: number;
  targetName: string;
  kind: Target["kind"];
  unit: TargetVerdict["unit"];
  limit: number;
  /** pass: every named log passes; fail: one fails; not-covered: otherwise. */
  status: ClaimStatus;
  /** The least margin over the named logs that passed or failed (the unit's), null if none. */
  margin: number | null;
  logs: ClaimLogVerdict[];
  /** The deviation recorded for this target, if any. */
  deviation: string | null;
  /** True when the claim stops the proposal: not a pass and no deviation recorded. */
  blocking: boolean;
  /** One sentence for people: why it blocks, or what it rests on. */
  detail: string;
}

/** What the check needs of each named drive log. */
export interface ClaimLog {
  id: number;
  fileName: string;
  damperVariant: string;
  /** Its latest analysis' verdicts (every target of the vehicle); null: not analysed. */
  verdicts: readonly TargetVerdict[] | null;
}

/**
 * Checks each claim against the named drive logs' verdicts. A log that is missing, of another
 * damper variant or not analysed is an input error (a message in `problems`), not a verdict.
 */
export function checkClaims(input: {
  targets: readonly Target[];
  claims: readonly SignoffClaimInput[];
  deviations: readonly SignoffDeviation[];
  logs: ReadonlyMap<number, ClaimLog>;
  damperVariant: string;
}): { checks: ClaimCheck[]; problems: string[]; blocked: boolean } {
  const problems: string[] = [];
  const byId = new Map(input.targets.map((t) => [t.id, t]));
  const deviationOf = new Map(input.deviations.map((d) => [d.targetId, d.reason]));
  const seen = new Set<number>();
  const checks: ClaimCheck[] = [];
  for (const claim of input.claims) {
    const target = byId.get(claim.targetId);
    if (!target) {
      problems.push(`Target ${claim.targetId} is not a target of this vehicle.`);
      continue;
    }
    if (seen.has(target.id)) {
      problems.push(`Target "${target.name}" is claimed twice; claim each target once.`);
      continue;
    }
    seen.add(target.id);
    const logs: ClaimLogVerdict[] = [];
    for (const logId of [...new Set(claim.logIds)]) {
      const log = input.logs.get(logId);
      if (!log) {
        problems.push(`Drive log ${logId} is not a drive log of this vehicle.`);
        continue;
      }
      if (log.damperVariant !== input.damperVariant) {
        problems.push(
          `Drive log "${log.fileName}" was recorded with damper variant "${log.damperVariant}", not "${input.damperVariant}".`,
        );
        continue;
      }
      const verdict = log.verdicts?.find((v) => v.targetId === target.id);
      if (!log.verdicts || !verdict) {
        problems.push(`Drive log "${log.fileName}" has no finished analysis yet.`);
        continue;
      }
      logs.push({
        logId,
        fileName: log.fileName,
        status: verdict.status,
        value: verdict.value,
        margin: verdict.margin,
        atRpm: verdict.atRpm,
        detail: verdict.detail,
      });
    }
    const margins = logs.flatMap((l) => (l.margin === null ? [] : [l.margin]));
    const status: ClaimStatus = logs.some((l) => l.status === "fail")
      ? "fail"
      : logs.length > 0 && logs.every((l) => l.status === "pass")
        ? "pass"
        : "not-covered";
    const deviation = deviationOf.get(target.id) ?? null;
    const blocking = status !== "pass" && deviation === null;
    checks.push({
      targetId: target.id,
      targetName: target.name,
      kind: target.kind,
      unit: unitOf(target),
      limit: limitOf(target),
      status,
      margin: margins.length ? Math.min(...margins) : null,
      logs,
      deviation,
      blocking,
      detail: claimDetail(status, logs, deviation),
    });
  }
  for (const d of input.deviations) {
    if (!seen.has(d.targetId) && byId.has(d.targetId))
      problems.push(
        `A deviation names target "${byId.get(d.targetId)!.name}", which is not claimed.`,
      );
  }
  return { checks, problems, blocked: problems.length > 0 || checks.some((c) => c.blocking) };
}

function unitOf(t: Target): TargetVerdict["unit"] {
  return t.kind === "rattle" ? "rad/s²" : t.kind === "twist-margin" ? "°" : "dB";
}

function limitOf(t: Target): number {
  return (
    (t.kind === "isolation"
      ? t.minDb
      : t.kind === "rattle"
        ? t.maxRadS2
        : t.kind === "start-stop"
          ? t.maxDb
          : t.minMarginDeg) ?? 0
  );
}

function claimDetail(
  status: ClaimStatus,
  logs: readonly ClaimLogVerdict[],
  deviation: string | null,
): string {
  const failing = logs.filter((l) => l.status === "fail").map((l) => l.fileName);
  const open = logs
    .filter((l) => l.status !== "pass" && l.status !== "fail")
    .map((l) => l.fileName);
  const base =
    status === "pass"
      ? `Every named drive log passes (${logs.length}).`
      : status === "fail"
        ? `Fails in ${failing.join(", ")}.`
        : logs.length === 0
          ? "No named drive log can judge this target."
          : `Not covered by ${open.join(", ")}.`;
  if (status === "pass") return base;
  return deviation === null
    ? `${base} Record a deviation with a reason, or name other drive logs.`
    : `${base} Deviation recorded: ${deviation}`;
}

// ---------------------------------------------------------------------------------------------
// Who decides

/**
 * Null when the caller may approve or reject the sign-off, else the reason for people. The
 * proposer never decides (four eyes); with approvers "admins" only an admin does; otherwise any
 * engineer or admin.
 */
export function mayDecide(input: {
  approvers: SignoffApprovers;
  caller: { userId: number; role: Role };
  proposedBy: number | null;
}): string | null {
  if (input.proposedBy !== null && input.caller.userId === input.proposedBy)
    return "You proposed this sign-off; a second person must approve or reject it.";
  if (input.approvers === "admins" && input.caller.role !== "admin")
    return "In this team only an admin approves or rejects sign-offs.";
  if (!canSignOff(input.caller.role))
    return "Only engineers and admins approve or reject sign-offs.";
  return null;
}

/** Engineers and admins propose and withdraw sign-offs; everyone in the team reads them. */
export function mayPropose(role: Role): boolean {
  return canSignOff(role);
}

// ---------------------------------------------------------------------------------------------
// The frozen record

/** A person as the record names them. */
export interface RecordPerson {
  id: number | null;
  name: string;
  email: string;
}

/** A target as it was when the sign-off was proposed. */
export type RecordTarget = Target & { updatedAt: string };

/** One claimed drive log as it was when proposed. */
export interface RecordLog {
  id: number;
  fileName: string;
  /** SHA-256 (hex) of the raw file's bytes as uploaded. */
  sha256: string;
  sizeBytes: number;
  uploadedAt: string;
  testDate: string | null;
  condition: LogCondition;
  gear: number | null;
  damperVariant: string;
  analysis: {
    id: number;
    version: number;
    createdAt: string;
    /** The settings the analysis ran with (analyses.settings). */
    settings: Record<string, unknown>;
    /** SHA-256 (hex) of the stored result JSON (the copy in signoff_results, decompressed). */
    resultSha256: string;
  };
}

/**
 * The sign-off as frozen: everything its verdicts rest on. `approval` is added when approved;
 * the digest is the SHA-256 of this object's canonical JSON (RFC 8785) at that moment.
 */
export interface SignoffRecord {
  format: "twistlog-signoff/1";
  signoffId: number;
  team: { id: number; name: string };
  vehicle: {
    id: number;
    identifier: string;
    name: string;
    damperType: string;
    /** Orders per crank revolution (z/2, or the vehicle's override); null if not known. */
    firingOrder: number | null;
    rattleLimitRadS2: number;
    damperTravelLimitDeg: number | null;
  };
  damperVariant: string;
  softwareVersion: string;
  targets: RecordTarget[];
  claims: ClaimCheck[];
  logs: RecordLog[];
  note: string;
  proposedBy: RecordPerson;
  proposedAt: string;
  approval?: { by: RecordPerson; at: string; comment: string };
}

/** The API's and the pages' view of a sign-off (GET /api/v1/signoffs/:id). */
export interface SignoffJson {
  id: number;
  vehicleId: number;
  damperVariant: string;
  state: SignoffState;
  note: string;
  claims: SignoffClaimInput[];
  deviations: SignoffDeviation[];
  proposedBy: RecordPerson;
  proposedAt: string;
  decidedBy: RecordPerson | null;
  decidedAt: string | null;
  decisionComment: string | null;
  /** SHA-256 of the approved record; null until approved. */
  digest: string | null;
  /** SHA-256 of the approved evidence report's PDF; null until approved. */
  reportSha256: string | null;
  /** Why it was superseded or withdrawn, and when. */
  closedAt: string | null;
  closedReason: string | null;
  history: { step: SignoffStep; by: string; at: string; text: string }[];
}

/** A sign-off's summary line: every claim's status, counted. */
export function claimTally(checks: readonly ClaimCheck[]) {
  return {
    pass: checks.filter((c) => c.status === "pass").length,
    deviations: checks.filter((c) => c.status !== "pass" && c.deviation !== null).length,
    blocking: checks.filter((c) => c.blocking).length,
  };
}
