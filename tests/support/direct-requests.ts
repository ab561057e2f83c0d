import { issueCsrfToken } from "~/lib/http/csrf.server";
import { startSession } from "~/lib/http/session.server";

// Calling route loaders and actions directly in node tests (docs/stack-notes.md: "Loaders and
// actions can be called directly with a Request"), with a real session row and a real signed
// CSRF cookie, so the same checks run as behind the HTTP server.

export const ORIGIN = "http://127.0.0.1:3999";

/** A browser stand-in: session cookie of `userId` in `teamId` (or none) and its CSRF token. */
export async function directClient(user: { id: number; teamId: number } | null) {
  const csrf = await issueCsrfToken(new Request(`${ORIGIN}/`));
  const cookies = [csrf.setCookie!.split(";")[0]!];
  if (user) {
    const set = await startSession(
      new Request(`${ORIGIN}/sign-in`),
      user.id,
      user.teamId,
      "127.0.0.1",
    );
    cookies.push(set.split(";")[0]!);
  }
  const cookie = cookies.join("; ");
  return {
    csrf: csrf.token,
    get(path: string, headers: Record<string, string> = {}) {
      return new Request(ORIGIN + path, { headers: { Cookie: cookie, ...headers } });
    },
    /** A form post like the browser's fetcher sends; `csrf: null` leaves the token out. */
    post(path: string, fields: Record<string, string | null>) {
      const body = new URLSearchParams();
      if (!("csrf" in fields)) body.set("csrf", csrf.token);
      for (const [k, v] of Object.entries(fields)) if (v !== null) body.set(k, v);
      return new Request(ORIGIN + path, {
        method: "POST",
        headers: {
          Cookie: cookie,
          Origin: ORIGIN,
          "Content-Type": "application/x-www-form-urlencoded",
        },
        body,
      });
    },
  };
}

/** A Bearer-token API request. */
export function apiRequest(
  path: string,
  token: string,
  init: { method?: string; json?: unknown; body?: string } = {},
) {
  const headers: Record<string, string> = { Authorization: `Bearer ${token}` };
  let body: string | undefined = init.body;
  if (init.json !== undefined) {
    headers["Content-Type"] = "application/json";
    body = JSON.stringify(init.json);
  }
  return new Request(ORIGIN + path, { method: init.method ?? "GET", headers, body });
}

/** Runs a loader or action; a thrown Response (redirect, 403, 404, 410) is returned instead. */
export async function run(fn: () => Promise<unknown> | unknown): Promise<Response> {
  try {
    const out = await fn();
    if (out instanceof Response) return out;
    return Response.json(out);
  } catch (error) {
    if (error instanceof Response) return error;
    // react-router's data() thrown from a loader: { type: "DataWithResponseInit", data, init }
    if (
      error &&
      typeof error === "object" &&
      "type" in error &&
      (error as { type: string }).type === "DataWithResponseInit"
    ) {
      const d = error as unknown as { data: unknown; init: ResponseInit | null };
      return new Response(
        typeof d.data === "string" ? d.data : JSON.stringify(d.data),
        d.init ?? undefined,
      );
    }
    throw error;
  }
}

export const context = { clientIp: "127.0.0.1" };
