/**
 * Answers a GET with a packed body (app/lib/base/packed-body.server.ts), so that a body which never
 * changes for one analysis version costs a request no more than a static file (docs/serving-speed.md).
 *
 * - Conditional request (RFC 9110 §13.1.2): If-None-Match is compared weakly; "*" or a listed tag
 *   equal to the selected representation's gives 304 with no body (§15.4.5), with the ETag, Vary
 *   and Cache-Control the 200 would have carried.
 * - Content codings (RFC 9110 §8.4, §12.5.3): br or gzip as Accept-Encoding allows (q=0 refuses;
 *   `*` stands for the codings not named), else the identity bytes. Each coding is a
 *   representation of its own, so each has its own strong tag (§8.8.3): the body's hash, with
 *   "-gzip" or "-br" after it. Responses with a strong tag are left alone by the server's
 *   compression middleware (server/index.ts): compressing again per request was the cost.
 * - Vary: Accept-Encoding on every answer, so a cache keeps the codings apart.
 *
 * The caller checks who may see the body before it asks for the answer: a 304 tells as much as
 * a 200 does, so a refused request never gets here.
 */
import type { PackedBody } from "../base/packed-body.server";

type Coding = "br" | "gzip" | "identity";

/**
 * The coding to send for an Accept-Encoding value: the acceptable one with the highest q,
 * brotli before gzip at equal q (smaller), identity when neither is acceptable.
 */
export function chooseCoding(acceptEncoding: string | null): Coding {
  if (!acceptEncoding) return "identity";
  const q = new Map<string, number>();
  for (const part of acceptEncoding.split(",")) {
    const [name, ...params] = part.trim().toLowerCase().split(";");
    if (!name) continue;
    const qParam = params.map((p) => p.trim()).find((p) => p.startsWith("q="));
    const value = qParam ? Number(qParam.slice(2)) : 1;
    q.set(name, Number.isFinite(value) ? value : 0);
  }
  const of = (coding: string) => q.get(coding) ?? q.get("*") ?? 0;
  const br = of("br");
  const gz = Math.max(of("gzip"), q.get("x-gzip") ?? 0);
  if (br > 0 && br >= gz) return "br";
  if (gz > 0) return "gzip";
  return "identity";
}

const etagOf = (tag: string, coding: Coding) =>
  coding === "identity" ? `"${tag}"` : `"${tag}-${coding}"`;

/** True when an If-None-Match value matches `etag` (weak comparison, RFC 9110 §8.8.3.2). */
export function noneMatch(ifNoneMatch: string | null, etag: string): boolean {
  if (ifNoneMatch === null) return false;
  if (ifNoneMatch.trim() === "*") return true;
  const opaque = etag.replace(/^W\//, "");
  return (ifNoneMatch.match(/(?:W\/)?"[^"]*"/g) ?? []).some(
    (listed) => listed.replace(/^W\//, "") === opaque,
  );
}

/**
 * The answer to a GET of a packed body: 304 when the client holds it, else 200 with the coding
 * it accepts. `headers` are the route's own (Content-Type is set here; Cache-Control defaults to
 * "private, no-cache": kept by the browser only, and asked again each time, which the 304 makes
 * cheap).
 */
export function packedResponse(
  request: Request,
  body: PackedBody,
  headers: Record<string, string> = {},
): Response {
  const coding = chooseCoding(request.headers.get("Accept-Encoding"));
  const etag = etagOf(body.tag, coding);
  const common: Record<string, string> = {
    "Cache-Control": "private, no-cache",
    ...headers,
    ETag: etag,
    Vary: "Accept-Encoding",
  };
  if (noneMatch(request.headers.get("If-None-Match"), etag))
    return new Response(null, { status: 304, headers: common });
  const bytes = body[coding];
  const out: Record<string, string> = {
    ...common,
    "Content-Type": "application/json; charset=utf-8",
    "Content-Length": String(bytes.length),
  };
  if (coding !== "identity") out["Content-Encoding"] = coding;
  return new Response(request.method === "HEAD" ? null : new Uint8Array(bytes), {
    status: 200,
    headers: out,
  });
}
