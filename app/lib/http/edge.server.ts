import { redirect } from "react-router";
import { requestLabel } from "../base/log-redaction";
import { DomainError, Unauthenticated } from "../domain/errors";
import {
  DATABASE_UNAVAILABLE_MESSAGE,
  databaseUnavailable,
  describeDbError,
} from "../infra/db-errors.server";
import { getEnv } from "../infra/env.server";

/**
 * The route's edge: every loader and action goes through one of three wrappers, and the one
 * mapper below turns what the layers underneath throw into the answer of that kind of route.
 *
 * - pageRoute (pages and their downloads): a domain error becomes a thrown plain-text Response
 *   with its status, which the route's ErrorBoundary shows; a signed-out GET is redirected to
 *   /sign-in and comes back afterwards.
 * - panelRoute (the JSON that our own pages fetch: share panel, comments): `{ error: { code,
 *   message } }` with the status, so the panel can say what went wrong without leaving the page;
 *   a signed-out GET is redirected like a page.
 * - apiRoute (/api/v1): `{ error: { code, message } }` always, with `WWW-Authenticate` on 401;
 *   a database that cannot be reached is 503 `database_unavailable`.
 *
 * A wrapper rather than route middleware: React Router's middleware sees a loader's error only
 * after it has been rendered into the ErrorBoundary as a 500 (`next()` never throws, by design),
 * so it cannot choose the status; a wrapper sees the error itself.
 *
 * The http layer's own refusals (a CSRF failure, a form body that cannot be read) are plain-text
 * Responses already; on a panel or the API they get the JSON shape here, with a code from their
 * status. Anything else is a bug and goes on to React Router's handleError (entry.server.tsx).
 */

export type Edge = "page" | "panel" | "api";

const noStore = { "Cache-Control": "no-store" };

/** The API's (and the panels') one error shape: { "error": { "code", "message" } }. */
export function apiError(status: number, code: string, message: string): Response {
  const headers: Record<string, string> = { ...noStore };
  if (status === 401) headers["WWW-Authenticate"] = 'Bearer realm="twistlog"';
  return Response.json({ error: { code, message } }, { status, headers });
}

/** Codes for the http layer's plain-text refusals, by status. */
const codeOfStatus: Record<number, string> = {
  400: "bad_request",
  401: "unauthorized",
  403: "forbidden",
  404: "not_found",
  405: "method_not_allowed",
  409: "conflict",
  410: "gone",
  413: "too_large",
  503: "database_unavailable",
};

function signInRedirect(request: Request): Response {
  const url = new URL(request.url);
  return redirect(`/sign-in?redirectTo=${encodeURIComponent(url.pathname + url.search)}`);
}

const isRead = (request: Request) => request.method === "GET" || request.method === "HEAD";

/**
 * The answer to `error` at an edge of kind `edge`, or null when it is no refusal (a bug, or a
 * redirect or Response that goes out as it is).
 */
export async function answerFor(
  error: unknown,
  request: Request,
  edge: Edge,
): Promise<Response | null> {
  if (error instanceof DomainError) {
    if (error instanceof Unauthenticated && edge !== "api" && isRead(request))
      return signInRedirect(request);
    if (edge === "page")
      return new Response(error.message, {
        status: error.status,
        headers: { "Content-Type": "text/plain" },
      });
    if (edge === "api") return apiError(error.status, error.code, error.message);
    return Response.json(
      { error: { code: error.code, message: error.message } },
      { status: error.status, headers: noStore },
    );
  }
  if (
    edge !== "page" &&
    error instanceof Response &&
    error.status >= 400 &&
    !(error.headers.get("Content-Type") ?? "").includes("json")
  ) {
    const message = (await error.text()) || "Request refused.";
    const code = codeOfStatus[error.status] ?? "error";
    if (edge === "api") return apiError(error.status, code, message);
    return Response.json({ error: { code, message } }, { status: error.status, headers: noStore });
  }
  if (edge === "api") {
    const down = databaseUnavailable(error);
    if (down) {
      console.error(`503 ${requestLabel(request)}: ${describeDbError(down, getEnv())}`);
      const response = apiError(503, "database_unavailable", DATABASE_UNAVAILABLE_MESSAGE);
      response.headers.set("Retry-After", "30");
      return response;
    }
  }
  return null;
}

type Handler<A, R> = (args: A) => R | Promise<R>;

/** A page's loader or action: refusals are thrown, for the route's ErrorBoundary. */
export function pageRoute<A extends { request: Request }, R>(
  handler: Handler<A, R>,
): (args: A) => Promise<R> {
  return async (args) => {
    try {
      return await handler(args);
    } catch (error) {
      throw (await answerFor(error, args.request, "page")) ?? error;
    }
  };
}

/**
 * A JSON route's loader or action: refusals are returned in the one JSON shape; a redirect (a
 * panel's signed-out GET goes to sign-in) is thrown, as React Router expects.
 */
function jsonRoute(edge: "panel" | "api") {
  return <A extends { request: Request }>(
    handler: Handler<A, Response>,
  ): ((args: A) => Promise<Response>) => {
    return async (args) => {
      try {
        return await handler(args);
      } catch (error) {
        const answer = await answerFor(error, args.request, edge);
        if (!answer || (answer.status >= 300 && answer.status < 400)) throw answer ?? error;
        return answer;
      }
    };
  };
}

/** A panel's resource route (the share panel, comments). */
export const panelRoute = jsonRoute("panel");

/** An /api/v1 loader or action: every refusal leaves in the API's JSON shape. */
export const apiRoute = jsonRoute("api");
