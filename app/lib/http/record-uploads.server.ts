/**
 * The upload of drive logs to a vehicle, the same for the vehicle page's form
 * (form-upload.server.ts) and POST /api/v1/vehicles/:vehicleId/logs: the caller's access (the
 * route's own check, passed in), the vehicle, the archived check, the files streamed into
 * storage with their test details (recordUpload), then the drive logs and their analysis jobs
 * in one transaction, which wakes the job runner (recordDriveLogs). A refusal before the files
 * are read drains the body first, so the client reads the answer instead of a reset connection.
 */
import { recordDriveLogs } from "../data/drive-log-intake.server";
import { vehicleData, type Vehicle } from "../data/vehicles.server";
import { blobStore, uploadMaxBytes } from "../infra/storage-settings.server";
import { idParam } from "./params";
import { discardBody, recordUpload, UploadError } from "./uploads.server";

export interface UploadOptions {
  /** The route's access check for the caller; what it throws is the answer (after draining). */
  access: () => Promise<{ teamId: number; userId: number }>;
  /** The `:vehicleId` of the URL. */
  vehicleId: string | undefined;
  maxFiles: number;
  /** See receiveUpload (the form checks its CSRF token placed before the files here). */
  beforeFirstFile?: (fields: Record<string, string>) => Promise<void>;
  /** See recordUpload (the form checks a CSRF token sent after the files here). */
  afterReceive?: (fields: Record<string, string>) => Promise<void>;
}

/**
 * Records the request's files as drive logs of the vehicle and queues their analyses. Refusals
 * after access are UploadErrors (with `forPage` for the form), the archived vehicle included.
 */
export async function recordUploads(request: Request, options: UploadOptions) {
  let teamId: number, userId: number, vehicle: Vehicle;
  try {
    ({ teamId, userId } = await options.access());
    vehicle = await vehicleData(teamId).vehicle(idParam(options.vehicleId));
  } catch (refusal) {
    await discardBody(request); // the client reads the 401/403/404 instead of a reset
    throw refusal;
  }
  if (vehicle.archivedAt) {
    await discardBody(request);
    throw new UploadError(
      409,
      "vehicle_archived",
      "This vehicle is archived: restore it before uploading.",
      "This vehicle is archived: an engineer restores it before new uploads.",
    );
  }
  const added = await recordUpload(request, {
    store: blobStore(),
    maxBytes: uploadMaxBytes(),
    maxFiles: options.maxFiles,
    beforeFirstFile: options.beforeFirstFile,
    afterReceive: options.afterReceive,
    record: (files, metadata, mapping) =>
      recordDriveLogs(teamId, { vehicle, files, metadata, mapping, uploadedBy: userId }),
  });
  return { teamId, vehicle, added };
}
