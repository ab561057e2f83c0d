/**
 * How large a request body may be (README, "Security"). Every request that is not an upload
 * carries a form or a small JSON object: 1 MiB is far above the largest of them (a comment, a
 * target, an e-mail list) and small enough that many concurrent anonymous bodies cannot fill
 * the server's memory. server/index.ts enforces it while reading, before any route sees the
 * body: a Content-Length above it is refused at once, a chunked body is cut off when it passes
 * it. Uploads (the vehicle page's form upload and POST /api/v1/vehicles/:id/logs) stream to
 * storage and have their own limit, UPLOAD_MAX_BYTES (app/lib/infra/storage-settings.server.ts).
 */
export const FORM_BODY_MAX_BYTES = 1024 * 1024;

export const BODY_TOO_LARGE_MESSAGE = `This request's body is larger than ${FORM_BODY_MAX_BYTES / 1024 / 1024} MB, the limit for anything that is not a drive-log upload.`;

/** The error a body stream ends with when it passes its limit. */
export class BodyTooLargeError extends Error {
  override name = "BodyTooLargeError";
  constructor(readonly limit: number) {
    super(`request body over ${limit} bytes`);
  }
}

/** By name: the server and the React Router build each load their own copy of this module. */
export function isBodyTooLarge(error: unknown): boolean {
  return error instanceof Error && error.name === "BodyTooLargeError";
}
