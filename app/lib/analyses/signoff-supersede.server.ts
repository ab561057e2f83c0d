/**
 * Superseding sign-offs (docs/signoff.md): a proposed or approved sign-off rests on the drive
 * logs' analyses, the targets and the vehicle's figures as they were. When one of them changes —
 * a claimed drive log gets a new analysis version (save.server.ts), is deleted, a claimed target
 * is changed or deleted, the vehicle's firing order or limits change — every open sign-off
 * resting on it is marked superseded, with the reason, in the same transaction as the change.
 * The frozen record, digest and report are never touched. Lives with the analyses because saving
 * an analysis is its main caller; the data layer calls it for the rest.
 */
import { and, eq, inArray } from "drizzle-orm";
import { auditEvents } from "~/lib/infra/db/schema";
import { signoffSteps, signoffs } from "~/lib/infra/db/schema-signoffs";
import { OPEN_STATES } from "../domain/signoff";
import type { Tx } from "./queue.server";

/** What changed: drive logs, targets, or (`vehicleFigures`) the vehicle itself. */
export interface SupersedeCause {
  vehicleId: number;
  logIds?: readonly number[];
  targetIds?: readonly number[];
  /** The vehicle's firing order or limits changed: every open sign-off of the vehicle. */
  vehicleFigures?: boolean;
}

/** Who caused it, for the history and the audit log; null: Twistlog itself (a finished job). */
export type SupersedeActor = { id: number | null; email: string; name: string; ip: string } | null;

/** Marks the open sign-offs resting on `cause` superseded; returns their ids. */
export async function supersedeSignoffs(
  tx: Tx,
  teamId: number,
  cause: SupersedeCause,
  reason: string,
  actor: SupersedeActor = null,
): Promise<number[]> {
  const open = await tx
    .select({ id: signoffs.id, claims: signoffs.claims, damperVariant: signoffs.damperVariant })
    .from(signoffs)
    .where(
      and(
        eq(signoffs.teamId, teamId),
        eq(signoffs.vehicleId, cause.vehicleId),
        inArray(signoffs.state, [...OPEN_STATES]),
      ),
    )
    .for("update");
  const logs = new Set(cause.logIds ?? []);
  const targets = new Set(cause.targetIds ?? []);
  const hit = open.filter(
    (s) =>
      cause.vehicleFigures ||
      s.claims.some((c) => targets.has(c.targetId) || c.logIds.some((id) => logs.has(id))),
  );
  if (hit.length === 0) return [];
  const ids = hit.map((s) => s.id);
  const now = new Date();
  const text = reason.slice(0, 1000);
  await tx
    .update(signoffs)
    .set({ state: "superseded", closedAt: now, closedReason: text, closedBy: actor?.id ?? null })
    .where(and(eq(signoffs.teamId, teamId), inArray(signoffs.id, ids)));
  await tx.insert(signoffSteps).values(
    ids.map((signoffId) => ({
      signoffId,
      step: "superseded" as const,
      actorUserId: actor?.id ?? null,
      actorName: actor?.name ?? "Twistlog",
      actorEmail: actor?.email ?? "",
      text,
      at: now,
    })),
  );
  await tx.insert(auditEvents).values(
    hit.map((s) => ({
      teamId,
      actorUserId: actor?.id ?? null,
      actorEmail: actor?.email ?? "twistlog",
      action: "signoff-superseded",
      detail: `sign-off ${s.id} (variant ${s.damperVariant}): ${text}`.slice(0, 500),
      ip: actor?.ip ?? "",
    })),
  );
  return ids;
}
