import { and, eq } from "drizzle-orm";
import { writeTransaction } from "../infra/db-errors.server";
import { driveLogs, vehicles } from "~/lib/infra/db/schema-drive-logs";
import { comments } from "~/lib/infra/db/schema-results";
import { supersedeSignoffs } from "../analyses/signoff-supersede.server";
import { db } from "../infra/db.server";
import { NotFound } from "../domain/errors";
import { audit } from "./audit.server";

/** Who deletes, for the sign-offs' history and the audit log. */
export interface RemovalActor {
  id: number;
  email: string;
  name: string;
  ip: string;
}

/**
 * Deletes a drive log of the team with its analyses, jobs, share links and comments (issue 16).
 * In the same transaction every open sign-off resting on it is superseded; a sign-off keeps its
 * own copy of the result and keeps the raw file alive (the storage sweep counts sign-offs'
 * files as referenced), so its evidence survives. An analysis still running for the log finds
 * its job gone and saves nothing. Audited as "drive-log-deleted".
 */
export async function removeDriveLog(
  teamId: number,
  logId: number,
  actor: RemovalActor,
): Promise<{ id: number; fileName: string; vehicleId: number; superseded: number[] }> {
  const [row] = await db
    .select({
      id: driveLogs.id,
      fileName: driveLogs.fileName,
      vehicleId: driveLogs.vehicleId,
      identifier: vehicles.identifier,
    })
    .from(driveLogs)
    .innerJoin(vehicles, eq(vehicles.id, driveLogs.vehicleId))
    .where(and(eq(driveLogs.id, logId), eq(driveLogs.teamId, teamId)));
  if (!row) throw new NotFound("No such drive log in this team.");
  const superseded = await writeTransaction(db, async (tx) => {
    const ids = await supersedeSignoffs(
      tx,
      teamId,
      { vehicleId: row.vehicleId, logIds: [row.id] },
      `Drive log "${row.fileName}" was deleted.`,
      actor,
    );
    await tx
      .delete(comments)
      .where(and(eq(comments.teamId, teamId), eq(comments.subjectKey, `log:${row.id}`)));
    await tx.delete(driveLogs).where(and(eq(driveLogs.id, row.id), eq(driveLogs.teamId, teamId)));
    return ids;
  });
  await audit({
    teamId,
    actor,
    action: "drive-log-deleted",
    detail: `${row.identifier}: drive log ${row.id} “${row.fileName}”${superseded.length ? `; superseded sign-off ${superseded.join(", ")}` : ""}`,
    ip: actor.ip,
  });
  return { id: row.id, fileName: row.fileName, vehicleId: row.vehicleId, superseded };
}
