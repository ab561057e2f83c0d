// Hands Express's requests to React Router. Based on @react-router/express 7.18.4's adapter (MIT),
// with two checks before a route runs, because that adapter gives the route the raw request
// stream and `request.formData()` would read a body of any size into memory:
//   - methods: a page or form route takes GET, HEAD and POST; a route without an action only
//     GET and HEAD (405 with Allow, never a 500 from an action that expected a form);
//   - body size: anything but an upload is limited to FORM_BODY_MAX_BYTES while reading
//     (app/lib/http/request-limits.ts): 413 at once for a larger Content-Length, and a chunked body
//     is cut off with 413 when it passes the limit. Uploads stream with their own limit.
import {
  createReadableStreamFromReadable,
  writeReadableStreamToWritable,
} from "@react-router/node";
import type express from "express";
import { randomUUID } from "node:crypto";
import { Transform, type TransformCallback } from "node:stream";
import {
  createRequestHandler as createRouterHandler,
  matchRoutes,
  type AppLoadContext,
  type RouteObject,
  type ServerBuild,
} from "react-router";
import { DATABASE_UNAVAILABLE_MESSAGE, failedOnDatabase } from "../app/lib/infra/db-errors.server";
import {
  BODY_TOO_LARGE_MESSAGE,
  BodyTooLargeError,
  FORM_BODY_MAX_BYTES,
} from "../app/lib/http/request-limits";
import { REQUEST_ID_HEADER } from "../app/lib/http/request-id";

type GetLoadContext = (req: express.Request, res: express.Response) => AppLoadContext;
type RouteInfo = { id: string; hasAction: boolean };

export function createRequestHandler(options: {
  build: ServerBuild | (() => Promise<ServerBuild>);
  mode?: string;
  getLoadContext: GetLoadContext;
}): express.RequestHandler {
  const handle = createRouterHandler(options.build, options.mode);
  return async (req, res, next) => {
    try {
      const build = typeof options.build === "function" ? await options.build() : options.build;
      const method = req.method;
      const reading = method !== "GET" && method !== "HEAD";
      // Matching costs as much as a small page's loader (React Router flattens and ranks the
      // route table on every call), so only requests with a body are matched here.
      const route = reading ? leafRoute(build, req.path) : undefined;
      const api = route ? route.id.startsWith("routes/api.") : /^\/api\//i.test(req.path);
      if (reading && route) {
        if (!route.hasAction)
          return refuse(res, api, 405, "This address only answers GET.", "GET, HEAD");
        if (!api && method !== "POST")
          return refuse(
            res,
            api,
            405,
            `This address does not take ${method}: use GET or POST.`,
            "GET, HEAD, POST",
          );
      }
      let body: NodeJS.ReadableStream | undefined;
      if (reading) {
        if (isUpload(route, req)) body = req;
        else {
          if (Number(req.headers["content-length"]) > FORM_BODY_MAX_BYTES)
            return refuse(res, api, 413, BODY_TOO_LARGE_MESSAGE);
          body = limitedBody(req, () => refuse(res, api, 413, BODY_TOO_LARGE_MESSAGE));
        }
        // server/index.ts leaves "Expect: 100-continue" to us: the client sends its body only now.
        if (/100-continue/i.test(req.headers.expect ?? "")) res.writeContinue();
      }
      const request = toRequest(req, res, body);
      let response = await handle(request, options.getLoadContext(req, res));
      // A resource route (JSON, CSV, a file) that failed on a database outage: 503, as pages
      // (app/entry.server.tsx) and the API (apiRoute) answer; React Router would say 500.
      if (response.status === 500 && !req.path.endsWith(".data") && failedOnDatabase(request)) {
        await response.body?.cancel();
        response = api
          ? Response.json(
              { error: { code: "database_unavailable", message: DATABASE_UNAVAILABLE_MESSAGE } },
              { status: 503, headers: { "Retry-After": "30", "Cache-Control": "no-store" } },
            )
          : new Response(DATABASE_UNAVAILABLE_MESSAGE, {
              status: 503,
              headers: {
                "Content-Type": "text/plain",
                "Retry-After": "30",
                "Cache-Control": "no-store",
              },
            });
      }
      await send(res, response);
    } catch (error) {
      next(error);
    }
  };
}

/**
 * The two upload routes, exactly as React Router matches them: the vehicle page's action with
 * a multipart body (its other forms are urlencoded; app/routes/vehicle.tsx) and the API's.
 */
function isUpload(route: RouteInfo | undefined, req: express.Request): boolean {
  if (req.method !== "POST" || !route) return false;
  if (route.id === "routes/api.v1.vehicle-logs") return true;
  const type = req.headers["content-type"] ?? "";
  return route.id === "routes/vehicle" && /^multipart\/form-data/i.test(type);
}

// React Router's own matcher on the build's route table, so the answer is the route that will
// run (case-insensitive, percent-decoded, static segments before dynamic ones), also for the
// `.data` URLs of client-side navigation and fetchers.
const trees = new WeakMap<ServerBuild, ReturnType<typeof routeTree>>();
function routeTree(build: ServerBuild): RouteObject[] {
  const all = Object.values(build.routes).filter((r) => r !== undefined);
  const children = (parentId: string | undefined): RouteObject[] =>
    all
      .filter((r) => r.parentId === parentId)
      .map((r) =>
        r.index
          ? { id: r.id, path: r.path, index: true, caseSensitive: r.caseSensitive }
          : { id: r.id, path: r.path, caseSensitive: r.caseSensitive, children: children(r.id) },
      );
  return children(undefined);
}

function leafRoute(build: ServerBuild, path: string): RouteInfo | undefined {
  let tree = trees.get(build);
  if (!tree) trees.set(build, (tree = routeTree(build)));
  let pathname = path;
  if (pathname.endsWith(".data"))
    pathname = pathname.slice(0, -".data".length).replace(/\/_root$/, "/") || "/";
  let matches;
  try {
    matches = matchRoutes(tree, pathname, build.basename);
  } catch {
    return undefined;
  }
  const id = matches?.at(-1)?.route.id;
  if (!id) return undefined;
  return { id, hasAction: typeof build.routes[id]?.module.action === "function" };
}

/** Passes the body on and ends it with BodyTooLargeError past the limit (after `onOver`). */
function limitedBody(req: express.Request, onOver: () => void): NodeJS.ReadableStream {
  let seen = 0;
  const limiter = new Transform({
    transform(chunk: Buffer, _encoding: BufferEncoding, callback: TransformCallback) {
      seen += chunk.length;
      if (seen <= FORM_BODY_MAX_BYTES) return callback(null, chunk);
      req.unpipe(limiter);
      onOver();
      callback(new BodyTooLargeError(FORM_BODY_MAX_BYTES));
    },
  });
  // A client that goes away mid-body ends the limited stream with its error (never unhandled).
  req.on("error", (error) => limiter.destroy(error));
  req.pipe(limiter);
  return limiter;
}

/** An answer before React Router: JSON in the API's shape under /api/, plain text elsewhere. */
function refuse(
  res: express.Response,
  api: boolean,
  status: number,
  message: string,
  allow?: string,
) {
  if (res.headersSent) return;
  if (allow) res.set("Allow", allow);
  if (status === 413 || status === 405) closeAfterAnswer(res);
  res.set("Cache-Control", "no-store");
  const code = status === 405 ? "method_not_allowed" : "too_large";
  if (api) res.status(status).json({ error: { code, message } });
  else res.status(status).type("text/plain").send(message);
}

/**
 * The rest of a refused body is not read into anything. The connection stays open a little
 * after the answer, discarding what still arrives, so that a client still sending reads the
 * answer instead of a reset; then it closes (at most LINGER_BYTES or LINGER_MS later).
 */
const LINGER_BYTES = 8 * 1024 * 1024;
const LINGER_MS = 2_000;
function closeAfterAnswer(res: express.Response) {
  const req = res.req;
  res.once("finish", () => {
    if (req.complete) return; // the whole request has arrived: the connection stays as it is
    const close = () => req.socket?.destroy();
    const timer = setTimeout(close, LINGER_MS).unref();
    let extra = 0;
    req.on("data", (chunk: Buffer) => {
      extra += chunk.length;
      if (extra > LINGER_BYTES) close();
    });
    req.once("end", () => clearTimeout(timer));
    req.on("error", () => clearTimeout(timer));
    req.resume();
  });
}

function toRequest(
  req: express.Request,
  res: express.Response,
  body: NodeJS.ReadableStream | undefined,
): Request {
  const [, forwardedPort] = req.app?.enabled("trust proxy")
    ? (req.get("X-Forwarded-Host")?.split(":") ?? [])
    : [];
  const [, hostPort] = req.get("host")?.split(":") ?? [];
  const port = [forwardedPort, hostPort]
    .map((p) => Number.parseInt(p ?? "", 10))
    .find((p) => Number.isSafeInteger(p));
  // An HTTP/1.0 request may have no Host header at all (a load balancer's health check).
  const hostname = req.hostname?.split(/[\\/?#@]/)[0] || "localhost";
  const url = new URL(`${req.protocol}://${hostname}${port ? `:${port}` : ""}${req.originalUrl}`);
  let controller: AbortController | null = new AbortController();
  const signal = controller.signal;
  res.on("finish", () => (controller = null));
  res.on("close", () => controller?.abort());
  const headers = new Headers();
  for (const [key, values] of Object.entries(req.headers)) {
    if (Array.isArray(values)) for (const value of values) headers.append(key, value);
    else if (values) headers.set(key, values);
  }
  // A `.data` answer is React Router's own encoding of the loaders' data: it reads a resource
  // route's Response body as text, so that body must come uncoded and whole (the compression
  // middleware then compresses the answer as a whole).
  if (req.path.endsWith(".data")) {
    headers.delete("accept-encoding");
    headers.delete("if-none-match");
  }
  // One id for a read's copies (app/lib/http/request-id.ts); a client's own value never counts.
  // A write has none: its loaders run after its action, which may have changed the session.
  headers.delete(REQUEST_ID_HEADER);
  if (req.method === "GET" || req.method === "HEAD") headers.set(REQUEST_ID_HEADER, randomUUID());
  const init: RequestInit & { duplex?: "half" } = { method: req.method, headers, signal };
  if (body) {
    init.body = createReadableStreamFromReadable(body as import("node:stream").Readable);
    init.duplex = "half";
  }
  return new Request(url.href, init);
}

async function send(res: express.Response, response: Response) {
  if (res.destroyed || res.writableEnded || res.headersSent) {
    await response.body?.cancel();
    return;
  }
  res.statusMessage = response.statusText;
  res.status(response.status);
  for (const [key, value] of response.headers.entries()) res.append(key, value);
  if (response.headers.get("Content-Type")?.match(/text\/event-stream/i)) res.flushHeaders();
  if (!response.body) return void res.end();
  try {
    await writeReadableStreamToWritable(response.body, res);
  } catch (error) {
    if (res.destroyed || res.writableEnded) return;
    throw error;
  }
}
