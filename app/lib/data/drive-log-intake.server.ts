/**
 * New drive logs and their analyses: the rows (vehicleData.addLogs) and one analysis job per
 * log (the analyses module's enqueueAnalysis, with the same transaction handle) commit together
 * or not at all; then this process's job runner is woken, so the analysis starts at once rather
 * than at the next poll. The one way uploads (recordUploads), the demo seed and tests add logs.
 */
import { enqueueAnalysis } from "../analyses/queue.server";
import { writeTransaction } from "../infra/db-errors.server";
import { wakeRunners } from "../analyses/runner.server";
import { jobSettingsFor } from "../analyses/settings";
import { db } from "../infra/db.server";
import type { IngestMapping } from "../domain/drive-log-terms";
import { teamData } from "./team-data.server";
import { vehicleData, type DriveLogRow } from "./vehicles.server";

type AddLogsArgs = Parameters<ReturnType<typeof vehicleData>["addLogs"]>[0] & {
  /** Channels chosen with the upload (timeChannel, …): this drive log's chosen mapping. */
  mapping?: IngestMapping | null;
};
/** A recorded drive log: its row as committed (status queued) and the earlier log of the same bytes. */
type Added = { id: number; duplicateOf: number | null; log: DriveLogRow };

/** Records the files as drive logs of `args.vehicle` and queues their analyses. */
export async function recordDriveLogs(teamId: number, args: AddLogsArgs): Promise<Added[]> {
  // Read once, before the transaction: every job of this upload freezes the same team settings.
  const team = await teamData(teamId).ingestSettings();
  const added = await writeTransaction(db, async (tx) => {
    const rows = await vehicleData(teamId).addLogs(args, tx);
    for (const { id } of rows) {
      await enqueueAnalysis(tx, {
        teamId,
        driveLogId: id,
        settings: jobSettingsFor(args.vehicle, args.mapping ?? null, {}, team),
      });
    }
    return rows;
  });
  // Read before the wake, so the answer shows the drive log as recorded (queued), not whatever
  // stage the runner has reached by the time the caller looks.
  const data = vehicleData(teamId);
  const recorded = await Promise.all(
    added.map(async (row) => ({ ...row, log: await data.log(row.id) })),
  );
  wakeRunners();
  return recorded;
}

/** recordDriveLogs for one file. */
export async function recordDriveLog(
  teamId: number,
  args: Omit<AddLogsArgs, "files"> & AddLogsArgs["files"][number],
): Promise<Added> {
  const { fileName, stored, ...rest } = args;
  const [added] = await recordDriveLogs(teamId, { ...rest, files: [{ fileName, stored }] });
  return added!;
}
