import { PassThrough } from "node:stream";

import type { AppLoadContext, EntryContext, HandleErrorFunction } from "react-router";
import { createReadableStreamFromReadable } from "@react-router/node";
import { isRouteErrorResponse, ServerRouter } from "react-router";
import { isbot } from "isbot";
import type { RenderToPipeableStreamOptions } from "react-dom/server";
import { renderToPipeableStream } from "react-dom/server";
import { NonceProvider } from "./components/nonce";
import {
  DATABASE_UNAVAILABLE_MESSAGE,
  databaseUnavailable,
  describeDbError,
  failedOnDatabase,
  markDatabaseDown,
} from "./lib/infra/db-errors.server";
import { getEnv } from "./lib/infra/env.server";
import { redactSecrets, requestLabel } from "./lib/base/log-redaction";
import { isBodyTooLarge } from "./lib/http/request-limits";

// React Router's default server entry, plus the CSP nonce (server/index.ts makes one per
// request) on every script React and React Router write into the page.

export const streamTimeout = 5_000;

// The 503 answers made for pages whose data failed on a database outage (logged already).
const outageAnswers = new WeakSet<Response>();
const outageRendered = new WeakSet<Request>();

/**
 * Every error React Router reports goes to the log as one redacted line (server/index.ts also
 * redacts whatever else is printed): nothing for an expected 4xx (a 404 for an unknown URL, a
 * 405, a thrown 4xx Response) nor for a request the client abandoned or a body cut off at the
 * size limit; one line without a stack for a database that cannot be reached (the page then
 * becomes a 503, below); the stack for anything else, which is a bug.
 */
export const handleError: HandleErrorFunction = (error, { request }) => {
  if (request.signal.aborted || isBodyTooLarge(error)) return;
  const status = isRouteErrorResponse(error)
    ? error.status
    : error instanceof Response
      ? error.status
      : 500;
  if (status < 500 || (error instanceof Response && outageAnswers.has(error))) return;
  const down = databaseUnavailable(error);
  if (down) {
    markDatabaseDown(request);
    console.error(`503 ${requestLabel(request)}: ${describeDbError(down, getEnv())}`);
    return;
  }
  if (error instanceof Response || isRouteErrorResponse(error)) {
    console.error(`${status} ${requestLabel(request)}`);
    return;
  }
  const e = error instanceof Error ? error : new Error(String(error));
  // The message may quote a URL or a value: redacted here too, not only by server/index.ts.
  console.error(
    redactSecrets(`500 ${requestLabel(request)}: ${e.stack ?? `${e.name}: ${e.message}`}`),
  );
};

export default function handleRequest(
  request: Request,
  responseStatusCode: number,
  responseHeaders: Headers,
  routerContext: EntryContext,
  loadContext: AppLoadContext,
) {
  const nonce = loadContext.cspNonce ?? "";
  // A page whose data could not be read because the database is down: React Router renders
  // again with this thrown Response, so the error boundary says so, with status 503.
  if (failedOnDatabase(request) && !outageRendered.has(request)) {
    outageRendered.add(request); // the second render shows the 503 below
    const answer = new Response(DATABASE_UNAVAILABLE_MESSAGE, {
      status: 503,
      headers: { "Content-Type": "text/plain" },
    });
    outageAnswers.add(answer);
    throw answer;
  }
  // https://httpwg.org/specs/rfc9110.html#HEAD
  if (request.method.toUpperCase() === "HEAD") {
    return new Response(null, {
      status: responseStatusCode,
      headers: responseHeaders,
    });
  }

  return new Promise((resolve, reject) => {
    let shellRendered = false;
    let userAgent = request.headers.get("user-agent");

    // Ensure requests from bots and SPA Mode renders wait for all content to load before responding
    let readyOption: keyof RenderToPipeableStreamOptions =
      (userAgent && isbot(userAgent)) || routerContext.isSpaMode ? "onAllReady" : "onShellReady";

    let timeoutId: ReturnType<typeof setTimeout> | undefined = setTimeout(
      () => abort(),
      streamTimeout + 1000,
    );

    const { pipe, abort } = renderToPipeableStream(
      <NonceProvider value={nonce}>
        <ServerRouter context={routerContext} url={request.url} nonce={nonce} />
      </NonceProvider>,
      {
        nonce,
        [readyOption]() {
          shellRendered = true;
          const body = new PassThrough({
            final(callback) {
              clearTimeout(timeoutId);
              timeoutId = undefined;
              callback();
            },
          });
          const stream = createReadableStreamFromReadable(body);

          responseHeaders.set("Content-Type", "text/html");

          pipe(body);

          resolve(
            new Response(stream, {
              headers: responseHeaders,
              status: responseStatusCode,
            }),
          );
        },
        onShellError(error: unknown) {
          reject(error);
        },
        onError(error: unknown) {
          responseStatusCode = 500;
          // Errors before the shell is rendered reject and are logged by React Router.
          if (shellRendered) {
            const e = error instanceof Error ? error : new Error(String(error));
            console.error(
              `500 ${requestLabel(request)} (while rendering): ${e.stack ?? e.message}`,
            );
          }
        },
      },
    );
  });
}
