/**
 * Secrets out of log lines (README, "Security"): share links (/s/<token>), password-reset and
 * invitation links, API tokens (Authorization: Bearer, or a bare twl_… token), our cookies and
 * secret-looking query parameters, and the values a failed SQL query carries. Applied to every
 * line the server writes (server/index.ts routes console output through it), so an error message
 * that quotes a URL (React Router's "No route matches URL …") cannot leak a token either.
 * The path word stays, so a line still tells which kind of link it was.
 */

export const REDACTED = "[redacted]";

// A path separator, raw or percent-encoded (a redirectTo=%2Fs%2F… query carries it encoded).
const SLASH = String.raw`(?:/|%2F)`;
// A token is base64url (app/lib/infra/secrets.server.ts); stop at anything that is not part of one.
const SEGMENT = String.raw`(?:(?!%2F)[A-Za-z0-9_.~%+=-])+`;

const rules: Array<[RegExp, string]> = [
  // Link paths whose next segment is a secret.
  [
    new RegExp(String.raw`(${SLASH}(?:s|reset-password|invitations)${SLASH})${SEGMENT}`, "gi"),
    `$1${REDACTED}`,
  ],
  // Authorization header values.
  [/\b(Bearer|Basic)(\s+)[^\s"',;]+/gi, `$1$2${REDACTED}`],
  // API tokens wherever they appear (app/lib/data/api-tokens.server.ts TOKEN_PREFIX).
  [/\btwl_[A-Za-z0-9_-]+/g, `twl_${REDACTED}`],
  // Our cookies (session, CSRF) in a Cookie or Set-Cookie header.
  [/\b(twistlog_[a-z_]+=)[^;\s"',]+/gi, `$1${REDACTED}`],
  // Query or form parameters that hold secrets.
  [/([?&](?:token|csrf|password|confirm|secret)=)[^&\s#"']+/gi, `$1${REDACTED}`],
  // drizzle's "Failed query: … params: …" lists the bound values (hashes, addresses).
  [/(\bparams:)[^\n]*/g, `$1 ${REDACTED}`],
];

/** The text with every secret this app knows the shape of replaced by [redacted]. */
export function redactSecrets(text: string): string {
  let out = text;
  for (const [pattern, replacement] of rules) out = out.replace(pattern, replacement);
  return out;
}

/** A request's method and path for a log line: redacted, without the query's values. */
export function requestLabel(request: { method: string; url: string }): string {
  let path: string;
  try {
    const url = new URL(request.url);
    path = url.pathname + (url.search ? "?…" : "");
  } catch {
    path = "(unreadable URL)";
  }
  return `${request.method} ${redactSecrets(path)}`;
}
