/**
 * The header by which the server's request handler (server/request-handler.ts) marks one GET or
 * HEAD request: a random id, set over anything the client sent under that name (a write gets
 * none: its loaders run after its action, which may have changed the session). React Router hands
 * each loader its own copy of the Request (query parameters stripped), so the copies of one
 * request are known by this id, never by object identity (app/lib/http/access.server.ts keeps
 * what one request read of its session by it).
 */
export const REQUEST_ID_HEADER = "x-twistlog-request-id";

/** The id of the HTTP request this Request is (a copy of), or null outside the server. */
export function requestId(request: Request): string | null {
  return request.headers.get(REQUEST_ID_HEADER);
}
