import { data, redirect } from "react-router";
import { assertCsrf } from "~/lib/csrf.server";
import { idParam } from "~/lib/params";
import { requireTeamRole } from "~/lib/permissions.server";
import { blobStore, uploadMaxBytes } from "~/lib/upload-settings.server";
import { discardBody, receiveUpload, UploadError } from "~/lib/uploads.server";
import { logMetadataSchema } from "~/lib/vehicle-schema";
import { vehicleData } from "~/lib/vehicles.server";

/**
 * The form upload without JavaScript: streams every file to storage (receiveUpload), then
 * checks the CSRF token that came with it, then records one drive log per file.
 */
export async function uploadFromForm(request: Request, vehicleIdParam: string | undefined) {
  let teamId: number, userId: number, vehicle;
  try {
    const current = await requireTeamRole(request, "technician");
    teamId = current.team.id;
    userId = current.user.id;
    vehicle = await vehicleData(teamId).vehicle(idParam(vehicleIdParam));
  } catch (refusal) {
    await discardBody(request); // the browser reads the 403/404 instead of a reset connection
    throw refusal;
  }
  if (vehicle.archivedAt) {
    await discardBody(request);
    return data(
      { uploadError: "This vehicle is archived: an engineer restores it before new uploads." },
      { status: 409 },
    );
  }
  let received;
  try {
    received = await receiveUpload(request, {
      store: blobStore(),
      maxBytes: uploadMaxBytes(),
      maxFiles: 20,
    });
  } catch (error) {
    if (error instanceof UploadError)
      return data({ uploadError: error.message }, { status: error.status });
    throw error;
  }
  const fields = new FormData();
  for (const [k, v] of Object.entries(received.fields)) fields.set(k, v);
  await assertCsrf(request, fields);
  const files = received.files.filter((f) => f.field === "file");
  if (files.length === 0)
    return data({ uploadError: "Choose at least one drive log file." }, { status: 400 });
  const metadata = logMetadataSchema.safeParse(received.fields);
  if (!metadata.success) {
    return data(
      { uploadError: metadata.error.issues.map((i) => i.message).join(" ") },
      { status: 400 },
    );
  }
  const vehicles = vehicleData(teamId);
  const added = [];
  for (const file of files) {
    const log = await vehicles.addLog({
      vehicle,
      fileName: file.fileName,
      stored: file.stored,
      metadata: metadata.data,
      uploadedBy: userId,
    });
    added.push(log);
  }
  const dup = added.filter((a) => a.duplicateOf).map((a) => `${a.id}-${a.duplicateOf}`);
  const query = new URLSearchParams({ uploaded: added.map((a) => a.id).join(",") });
  if (dup.length) query.set("dup", dup.join(","));
  return redirect(`/vehicles/${vehicle.id}?${query}#drive-logs-title`);
}
