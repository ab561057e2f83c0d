/**
 * The refusals that data and domain code throw: not found, forbidden, conflict, invalid, gone,
 * and unauthenticated (who is asking is unknown). Each has a `code` (a stable word the API
 * sends in `{ error: { code, message } }`) and a plain `message` for people. None of them is an
 * HTTP response: app/lib/http/edge.server.ts turns them into the page's error boundary or the
 * API's JSON at the route's edge.
 *
 * `status` is the HTTP status the edge answers with; it rides on the error so that the kinds and
 * their statuses are written down once, here, next to each other.
 */
export class DomainError extends Error {
  readonly code: string;
  readonly status: number;

  constructor(status: number, code: string, message: string) {
    super(message);
    this.name = new.target.name;
    this.status = status;
    this.code = code;
  }
}

/** The thing does not exist, or belongs to another team (which is the same to the caller). */
export class NotFound extends DomainError {
  constructor(message = "Not found.", code = "not_found") {
    super(404, code, message);
  }
}

/** The caller is known but may not do this. */
export class Forbidden extends DomainError {
  constructor(message: string, code = "forbidden") {
    super(403, code, message);
  }
}

/** The request clashes with the thing's state (e.g. a revoked link cannot be extended). */
export class Conflict extends DomainError {
  constructor(message: string, code = "conflict") {
    super(409, code, message);
  }
}

/** The input is not acceptable. */
export class Invalid extends DomainError {
  constructor(message: string, code = "bad_request") {
    super(400, code, message);
  }
}

/** The thing existed but is used up or expired (an invitation, a password-reset link). */
export class Gone extends DomainError {
  constructor(message: string, code = "gone") {
    super(410, code, message);
  }
}

/** Nobody is signed in (no session, no valid API token). */
export class Unauthenticated extends DomainError {
  constructor(message: string, code = "unauthorized") {
    super(401, code, message);
  }
}
