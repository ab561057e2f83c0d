import { describe, expect, it } from "vitest";
import {
  Conflict,
  Forbidden,
  Gone,
  Invalid,
  NotFound,
  Unauthenticated,
  type DomainError,
} from "~/lib/domain/errors";
import { answerFor, apiRoute, pageRoute, panelRoute } from "~/lib/http/edge.server";

// The one mapper at the route edge (app/lib/http/edge.server.ts): each domain error becomes the
// page's plain-text answer (for the ErrorBoundary) or the { error: { code, message } } JSON of a
// panel or the API, with the status RFC 9110 gives its meaning: 400 Bad Request (§15.5.1),
// 401 Unauthorized (§15.5.2, which must carry WWW-Authenticate), 403 Forbidden (§15.5.4),
// 404 Not Found (§15.5.5), 409 Conflict (§15.5.10), 410 Gone (§15.5.11).

const cases: [DomainError, number, string][] = [
  [new Invalid("Choose one of the roles."), 400, "bad_request"],
  [new Unauthenticated("Please sign in first."), 401, "unauthorized"],
  [new Forbidden("Not yours."), 403, "forbidden"],
  [new NotFound("No such vehicle in this team."), 404, "not_found"],
  [new Conflict("This share link is revoked."), 409, "conflict"],
  [new Gone("This link was already used."), 410, "gone"],
];

const post = (url = "http://twistlog.test/vehicles/7") => new Request(url, { method: "POST" });
const get = (url = "http://twistlog.test/vehicles/7?tab=logs") => new Request(url);

describe("the edge mapper", () => {
  it.each(cases)(
    "a page shows %s as a plain-text answer with its status",
    async (error, status) => {
      const answer = await answerFor(error, post(), "page");
      expect(answer?.status).toBe(status);
      expect(answer?.headers.get("Content-Type")).toBe("text/plain");
      expect(await answer?.text()).toBe(error.message);
    },
  );

  it.each(cases)(
    "the API answers %s as { error: { code, message } }",
    async (error, status, code) => {
      const answer = await answerFor(error, get("http://twistlog.test/api/v1/vehicles"), "api");
      expect(answer?.status).toBe(status);
      expect(answer?.headers.get("Cache-Control")).toBe("no-store");
      expect(await answer?.json()).toEqual({ error: { code, message: error.message } });
    },
  );

  it.each(cases)(
    "a panel's post answers %s in the same JSON shape",
    async (error, status, code) => {
      const answer = await answerFor(error, post(), "panel");
      expect(answer?.status).toBe(status);
      expect(await answer?.json()).toEqual({ error: { code, message: error.message } });
    },
  );

  it("the API's 401 names the Bearer scheme (RFC 9110 §11.6.1, RFC 6750 §3)", async () => {
    const answer = await answerFor(new Unauthenticated("Send a token."), get(), "api");
    expect(answer?.headers.get("WWW-Authenticate")).toBe('Bearer realm="twistlog"');
  });

  it("a signed-out GET of a page or a panel goes to sign-in and comes back", async () => {
    for (const edge of ["page", "panel"] as const) {
      const answer = await answerFor(new Unauthenticated("Please sign in first."), get(), edge);
      expect(answer?.status).toBe(302);
      expect(answer?.headers.get("Location")).toBe(
        `/sign-in?redirectTo=${encodeURIComponent("/vehicles/7?tab=logs")}`,
      );
    }
  });

  it("the http layer's plain-text refusals get the JSON shape on the API, not on pages", async () => {
    const refusal = () => new Response("The form's token was missing.", { status: 403 });
    const api = await answerFor(refusal(), post(), "api");
    expect(await api?.json()).toEqual({
      error: { code: "forbidden", message: "The form's token was missing." },
    });
    expect(await answerFor(refusal(), post(), "page")).toBeNull();
  });

  it("anything else is no refusal: it goes on to React Router's handleError", async () => {
    const bug = new TypeError("x is undefined");
    for (const edge of ["page", "panel", "api"] as const)
      expect(await answerFor(bug, post(), edge)).toBeNull();
  });
});

describe("the edge wrappers", () => {
  const refuse = () => Promise.reject(new NotFound("No such drive log in this team."));

  it("pageRoute throws the answer, for the route's ErrorBoundary", async () => {
    const thrown = await pageRoute(refuse)({ request: get() }).catch((e: unknown) => e);
    expect(thrown).toBeInstanceOf(Response);
    expect((thrown as Response).status).toBe(404);
    expect(await (thrown as Response).text()).toBe("No such drive log in this team.");
  });

  it("panelRoute and apiRoute return it", async () => {
    for (const wrap of [panelRoute, apiRoute]) {
      const answer = await wrap(refuse)({ request: post() });
      expect(answer.status).toBe(404);
      expect(await answer.json()).toEqual({
        error: { code: "not_found", message: "No such drive log in this team." },
      });
    }
  });

  it("panelRoute throws the sign-in redirect of a signed-out GET", async () => {
    const signedOut = () => Promise.reject(new Unauthenticated("Please sign in first."));
    const thrown = await panelRoute(signedOut)({ request: get() }).catch((e: unknown) => e);
    expect((thrown as Response).status).toBe(302);
  });

  it("a bug leaves the wrapper as it came", async () => {
    const bug = new RangeError("out of range");
    const fail = () => Promise.reject(bug);
    for (const wrap of [pageRoute, panelRoute, apiRoute])
      await expect(wrap(fail)({ request: get() })).rejects.toBe(bug);
  });
});
