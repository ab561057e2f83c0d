/**
 * The sign-off pages' server side (issue 16): the vehicle page's Sign-off card, the proposal
 * form's data and parsing, and the sign-off page's data. The rules are domain/signoff.ts, the
 * records data/signoffs.server.ts; this module shapes them for the pages.
 */
import { signoffData } from "../data/signoffs.server";
import { targetData, toTarget } from "../data/targets.server";
import { teamData } from "../data/team-data.server";
import { vehicleData } from "../data/vehicles.server";
import type { Role } from "../domain/roles";
import {
  signoffInputSchema,
  type ClaimCheck,
  type SignoffInput,
  type SignoffJson,
  type SignoffRecord,
} from "../domain/signoff";
import type { TargetVerdict } from "../domain/targets";
import { limitText, scopeText } from "../domain/target-text";

/** The vehicle page's card: each damper variant's line, the team's approvers and who reads it. */
export async function signoffCardData(
  teamId: number,
  vehicleId: number,
  me: { userId: number; role: Role },
) {
  const [variants, team] = await Promise.all([
    signoffData(teamId).variants(vehicleId),
    teamData(teamId).team(),
  ]);
  return { variants, approvers: team.signoffApprovers, me };
}

// ---------------------------------------------------------------------------------------------
// The proposal form

/** One claim as the form holds it: ticked or not, the drive logs named, the deviation's text. */
export interface ClaimValues {
  targetId: number;
  on: boolean;
  logIds: number[];
  deviation: string;
}
export interface ProposalValues {
  damperVariant: string;
  note: string;
  claims: ClaimValues[];
}

/** A finished drive log of the chosen variant with its verdict against every target. */
export interface ProposalLog {
  id: number;
  fileName: string;
  condition: string;
  gear: number | null;
  date: string;
  damperVariant: string;
  verdicts: TargetVerdict[];
}

/** What the proposal page shows: the vehicle, its variants, targets and finished logs. */
export async function proposalData(teamId: number, vehicleId: number, wanted: string | null) {
  const vehicles = vehicleData(teamId);
  const targets = targetData(teamId);
  const vehicle = await vehicles.vehicle(vehicleId);
  const [logs, rows] = await Promise.all([
    vehicles.logsWithSummary(vehicle.id),
    targets.list(vehicle.id),
  ]);
  const finished = logs.filter((l) => l.latestAnalysisId !== null && l.status === "done");
  const variants = [...new Set(finished.map((l) => l.damperVariant))].sort();
  const damperVariant =
    wanted !== null && variants.includes(wanted) ? wanted : (variants[0] ?? wanted ?? "");
  const mine = finished.filter((l) => l.damperVariant === damperVariant);
  const verdicts = await targets.verdictsForLogs(vehicle.id, mine, rows);
  const list: ProposalLog[] = mine.map((l) => ({
    id: l.id,
    fileName: l.fileName,
    condition: l.condition,
    gear: l.gear,
    date: l.testDate ?? l.uploadedAt.toISOString().slice(0, 10),
    damperVariant: l.damperVariant,
    verdicts: verdicts.get(l.id) ?? [],
  }));
  const judged = rows.map(toTarget);
  return {
    vehicle: { id: vehicle.id, identifier: vehicle.identifier, name: vehicle.name },
    variants,
    damperVariant,
    targets: judged.map((t) => ({
      ...t,
      limit: limitText(t),
      scope: scopeText(t),
    })),
    logs: list,
  };
}

/**
 * The form's first values: every target that some drive log passes or fails is claimed, with
 * the drive logs that pass it named; nothing else.
 */
export function defaultProposal(
  damperVariant: string,
  targetIds: number[],
  logs: ProposalLog[],
): ProposalValues {
  return {
    damperVariant,
    note: "",
    claims: targetIds.map((targetId) => {
      const of = (l: ProposalLog) => l.verdicts.find((v) => v.targetId === targetId);
      const passing = logs.filter((l) => of(l)?.status === "pass").map((l) => l.id);
      const judged = logs.some((l) => of(l)?.status === "pass" || of(l)?.status === "fail");
      return { targetId, on: judged && passing.length > 0, logIds: passing, deviation: "" };
    }),
  };
}

const idOf = (s: string) => (/^\d{1,15}$/.test(s) ? Number(s) : null);

/**
 * Reads the proposal form: `damperVariant`, `note`, `claim` (ticked target ids), `logs-<target>`
 * (drive-log ids) and `deviation-<target>` (text). Returns the values as typed (shown again on
 * a refusal, so nothing is lost), the input for the data layer, and errors keyed by field name.
 */
export function readProposal(form: FormData): {
  values: ProposalValues;
  input: SignoffInput | null;
  errors: Record<string, string>;
} {
  const text = (name: string) => {
    const v = form.get(name);
    return typeof v === "string" ? v : "";
  };
  const byTarget = new Map<number, ClaimValues>();
  const claimOf = (targetId: number) => {
    let c = byTarget.get(targetId);
    if (!c) byTarget.set(targetId, (c = { targetId, on: false, logIds: [], deviation: "" }));
    return c;
  };
  for (const v of form.getAll("claim")) {
    const id = typeof v === "string" ? idOf(v) : null;
    if (id !== null) claimOf(id).on = true;
  }
  for (const [name, v] of form.entries()) {
    const m = /^(logs|deviation)-(\d{1,15})$/.exec(name);
    if (!m || typeof v !== "string") continue;
    const c = claimOf(Number(m[2]));
    if (m[1] === "deviation") c.deviation = v;
    else if (idOf(v) !== null) c.logIds.push(Number(v));
  }
  const values: ProposalValues = {
    damperVariant: text("damperVariant"),
    note: text("note"),
    claims: [...byTarget.values()],
  };
  const on = values.claims.filter((c) => c.on);
  const parsed = signoffInputSchema.safeParse({
    damperVariant: values.damperVariant,
    note: values.note,
    claims: on.map((c) => ({ targetId: c.targetId, logIds: c.logIds })),
    deviations: on
      .filter((c) => c.deviation.trim() !== "")
      .map((c) => ({ targetId: c.targetId, reason: c.deviation })),
  });
  if (parsed.success) return { values, input: parsed.data, errors: {} };
  const errors: Record<string, string> = {};
  const devs = on.filter((c) => c.deviation.trim() !== "");
  for (const issue of parsed.error.issues) {
    const [head, index] = issue.path;
    const key =
      head === "claims" && typeof index === "number"
        ? `logs-${on[index]!.targetId}`
        : head === "deviations" && typeof index === "number"
          ? `deviation-${devs[index]!.targetId}`
          : head === "claims"
            ? "form"
            : String(head ?? "form");
    errors[key] ??= issue.message;
  }
  return { values, input: null, errors };
}

/** The claim check's blocking claims as field errors (the deviation's field of each). */
export function blockingErrors(checks: ClaimCheck[]): Record<string, string> {
  const errors: Record<string, string> = {};
  for (const c of checks)
    if (c.blocking)
      errors[`deviation-${c.targetId}`] =
        c.status === "fail"
          ? "A named drive log fails this target: record a deviation with its reason, or name other drive logs."
          : "No named drive log judges this target: record a deviation with its reason, or name other drive logs.";
  return errors;
}

// ---------------------------------------------------------------------------------------------
// The sign-off page

/** A person on a page a guest may read: the name only, never the address. */
const nameOf = (p: { name: string } | null) => (p ? { name: p.name } : null);

/**
 * A sign-off and its frozen record, shaped for a page. `guest`: for a share link, without any
 * e-mail address, user id or ids of the team's other records beyond the claimed drive logs.
 */
export function signoffView(signoff: SignoffJson, record: SignoffRecord) {
  return {
    id: signoff.id,
    state: signoff.state,
    damperVariant: signoff.damperVariant,
    note: signoff.note,
    proposedBy: nameOf(signoff.proposedBy)!,
    proposedAt: signoff.proposedAt,
    decidedBy: nameOf(signoff.decidedBy),
    decidedAt: signoff.decidedAt,
    decisionComment: signoff.decisionComment,
    digest: signoff.digest,
    reportSha256: signoff.reportSha256,
    closedAt: signoff.closedAt,
    closedReason: signoff.closedReason,
    history: signoff.history.map((h) => ({ step: h.step, by: h.by, at: h.at, text: h.text })),
    softwareVersion: record.softwareVersion,
    vehicle: {
      identifier: record.vehicle.identifier,
      name: record.vehicle.name,
      firingOrder: record.vehicle.firingOrder,
      rattleLimitRadS2: record.vehicle.rattleLimitRadS2,
      damperTravelLimitDeg: record.vehicle.damperTravelLimitDeg,
    },
    claims: record.claims,
    targets: record.targets.map((t) => ({ id: t.id, name: t.name, limit: limitText(t) })),
    logs: record.logs.map((l) => ({
      id: l.id,
      fileName: l.fileName,
      sha256: l.sha256,
      sizeBytes: l.sizeBytes,
      uploadedAt: l.uploadedAt,
      testDate: l.testDate,
      condition: l.condition,
      gear: l.gear,
      analysis: {
        version: l.analysis.version,
        createdAt: l.analysis.createdAt,
        settings: l.analysis.settings,
        resultSha256: l.analysis.resultSha256,
      },
    })),
    approval: record.approval
      ? { by: record.approval.by.name, at: record.approval.at, comment: record.approval.comment }
      : null,
  };
}
export type SignoffView = ReturnType<typeof signoffView>;
