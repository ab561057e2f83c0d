import { data, redirect } from "react-router";
import { assertCsrf, assertSameOrigin, CSRF_FIELD } from "~/lib/http/csrf.server";
import { requireAccess } from "~/lib/http/access.server";
import { recordUploads } from "~/lib/http/record-uploads.server";
import { UploadError } from "~/lib/http/uploads.server";

/**
 * The form upload without JavaScript: streams every file to storage and records one drive log
 * per file (recordUploads, shared with the API). The form's CSRF token comes before its file
 * input, so a wrong token is refused before anything is stored; a token sent after the files
 * is checked once they are in, and a refusal removes them.
 */
export async function uploadFromForm(request: Request, vehicleIdParam: string | undefined) {
  const checkToken = (fields: Record<string, string>) => {
    const form = new FormData();
    for (const [k, v] of Object.entries(fields)) form.set(k, v);
    return assertCsrf(request, form);
  };
  let uploaded;
  try {
    uploaded = await recordUploads(request, {
      access: async () => {
        assertSameOrigin(request); // another site's page: refused before the body is read
        const current = await requireAccess(request, "technician");
        return { teamId: current.team.id, userId: current.user.id };
      },
      vehicleId: vehicleIdParam,
      maxFiles: 20,
      beforeFirstFile: async (fields) => {
        if (fields[CSRF_FIELD] !== undefined) await checkToken(fields);
      },
      afterReceive: checkToken,
    });
  } catch (error) {
    // With the database away the page around the message cannot be drawn: the error page
    // says so instead (a 503, not a bare 500).
    if (error instanceof UploadError && error.code === "database_unavailable")
      throw data(error.forPage, { status: 503 });
    if (error instanceof UploadError)
      return data({ uploadError: error.forPage }, { status: error.status });
    throw error;
  }
  const { vehicle, added } = uploaded;
  const dup = added.filter((a) => a.duplicateOf).map((a) => `${a.id}-${a.duplicateOf}`);
  const query = new URLSearchParams({ uploaded: added.map((a) => a.id).join(",") });
  if (dup.length) query.set("dup", dup.join(","));
  return redirect(`/vehicles/${vehicle.id}?${query}#drive-logs-title`);
}
