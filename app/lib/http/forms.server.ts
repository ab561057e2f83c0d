import { BODY_TOO_LARGE_MESSAGE, isBodyTooLarge } from "./request-limits";

/**
 * The one way actions read a form (`readForm(request)` instead of `request.formData()`): a post
 * without a form body, with another content type, a multipart body without its boundary or one
 * that does not parse is a 400 with a plain message (the error boundary, or a resource route's
 * JSON, shows it), never a 500. A body over the size limit (server/index.ts cuts it off while
 * reading) is 413. Uploads do not come here: they stream (app/lib/http/uploads.server.ts).
 */
export async function readForm(request: Request): Promise<FormData> {
  const type = (request.headers.get("Content-Type") ?? "").toLowerCase();
  const urlencoded = type.startsWith("application/x-www-form-urlencoded");
  const multipart = type.startsWith("multipart/form-data");
  if (!urlencoded && !multipart) {
    throw refused(
      400,
      "This address takes a form (application/x-www-form-urlencoded or multipart/form-data), as a browser sends it; this request had none.",
    );
  }
  if (multipart && !/;\s*boundary=/.test(type)) {
    throw refused(400, "This multipart form has no boundary, so it cannot be read.");
  }
  try {
    return await request.formData();
  } catch (error) {
    if (isBodyTooLarge(error) || request.signal.aborted) throw refused(413, BODY_TOO_LARGE_MESSAGE);
    throw refused(400, "This form could not be read: it is not a well-formed form body.");
  }
}

function refused(status: number, message: string): Response {
  return new Response(message, { status, headers: { "Content-Type": "text/plain" } });
}
