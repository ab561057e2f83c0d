import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { pool } from "~/lib/infra/db.server";
import { FORM_BODY_MAX_BYTES } from "~/lib/http/request-limits";
import { HttpClient } from "../support/http-client";
import { repoRoot, startServer } from "../support/processes";
import { sendBody } from "../support/raw-http";

// Request plumbing against the production server (server/request-handler.ts, app/lib/http/forms.server.ts):
// bodies that are not uploads are limited to 1 MiB while reading (issue 12 §4), and the
// requests that used to end in a 500 with a stack trace get their 4xx (issue 12 §7).

let server: Awaited<ReturnType<typeof startServer>>;
beforeAll(async () => {
  server = await startServer({});
});
afterAll(async () => {
  await server?.stop();
  await pool.end();
});

const MB = 1024 * 1024;
const form = { "Content-Type": "application/x-www-form-urlencoded" };
const multipart = { "Content-Type": "multipart/form-data; boundary=----plumbing" };

/** The server's resident memory in MB (Linux /proc, the kernel's own count). */
function rssMb(): number {
  const status = readFileSync(`/proc/${server.pid}/status`, "utf8");
  return Number(/VmRSS:\s+(\d+)\s+kB/.exec(status)![1]) / 1024;
}

/** The server log since `from` holds no stack trace and no error name with a message. */
function expectNoStack(from: number) {
  const log = server.output().slice(from);
  expect(log).not.toMatch(/^\s+at \S/m);
  expect(log).not.toMatch(/\b\w*Error: /);
}

describe("body size before authentication (issue 12 §4)", () => {
  it("the limit is 1 MiB, as README 'Security' documents", () => {
    expect(FORM_BODY_MAX_BYTES).toBe(1024 * 1024);
  });

  it("an announced body over the limit is refused with 413 before any of it is sent", async () => {
    const answer = await sendBody(server.url, "/sign-in", {
      headers: form,
      bytes: 400 * MB,
      contentLength: true,
      expectContinue: true,
    });
    expect(answer.status).toBe(413);
    expect(answer.body).toContain("larger than 1 MB");
    expect(answer.sentBeforeAnswer).toBe(0);
  });

  it("six concurrent anonymous 100 MB bodies, announced or chunked, get 413 and leave memory flat", async () => {
    const before = rssMb();
    let peak = before;
    const sampler = setInterval(() => (peak = Math.max(peak, rssMb())), 20);
    const answers = await Promise.all(
      [true, false, true, false, true, false].map((contentLength) =>
        sendBody(server.url, "/sign-in", { headers: form, bytes: 100 * MB, contentLength }),
      ),
    );
    clearInterval(sampler);
    for (const answer of answers) {
      expect(answer.status).toBe(413);
      // Refused while the body was still coming: far less than the 100 MB had been sent.
      expect(answer.sentBeforeAnswer).toBeLessThan(50 * MB);
    }
    // 600 MB of bodies: a server that read them would grow by hundreds of MB. The bound is
    // 100 MB (the 1 MiB limit × 6, plus sockets, buffers and the garbage collector's slack).
    expect(peak - before).toBeLessThan(100);
    const health = await fetch(`${server.url}/healthz`);
    expect(health.status).toBe(200);
  });

  it("a chunked body over the limit is cut off with 413; one under it is read", async () => {
    const over = await sendBody(server.url, "/forgot-password", {
      headers: form,
      bytes: FORM_BODY_MAX_BYTES + 64 * 1024,
    });
    expect(over.status).toBe(413);
    const under = await sendBody(server.url, "/forgot-password", {
      headers: form,
      bytes: FORM_BODY_MAX_BYTES - 1024,
    });
    // Read to the end, then refused for its missing CSRF token (docs/decisions/005-csrf.md).
    expect(under.status).toBe(403);
  });

  it("the API answers 413 in its JSON error shape", async () => {
    const answer = await sendBody(server.url, "/api/v1/vehicles", {
      headers: { "Content-Type": "application/json" },
      bytes: 2 * MB,
      contentLength: true,
    });
    expect(answer.status).toBe(413);
    expect(JSON.parse(answer.body)).toEqual({
      error: { code: "too_large", message: expect.stringContaining("1 MB") },
    });
  });

  it.each([
    ["/sign-in", multipart],
    ["/vehicles/new", multipart],
    // React Router matches case-insensitively and percent-decoded: still the new-vehicle form.
    ["/Vehicles/NEW", multipart],
    ["/vehicles/n%65w", multipart],
    ["/vehicles/1/edit", multipart],
    ["/vehicles/1", form],
    ["/vehicles/1.data", form],
  ])("POST %s with 2 MB is over the form limit (413)", async (path, headers) => {
    const answer = await sendBody(server.url, path, {
      headers,
      bytes: 2 * MB,
      contentLength: true,
    });
    expect(answer.status).toBe(413);
  });

  it.each([
    ["/vehicles/1", multipart, 401],
    ["/api/v1/vehicles/1/logs", { ...multipart, Authorization: "Bearer twl_not-a-token" }, 401],
  ])(
    "the upload route %s keeps its own limit: 2 MB reach its access check",
    async (path, headers, status) => {
      const answer = await sendBody(server.url, path, {
        headers,
        bytes: 2 * MB,
        contentLength: true,
      });
      expect(answer.status).toBe(status);
    },
  );
});

/** Every route of app/routes.ts whose module has an action, with sample parameters. */
function routesWithActions(): Array<{ path: string; file: string }> {
  const table = readFileSync(`${repoRoot}/app/routes.ts`, "utf8");
  const out: Array<{ path: string; file: string }> = [];
  for (const [, path, file] of table.matchAll(/route\("([^"]+)", "([^"]+)"\)/g)) {
    const source = readFileSync(`${repoRoot}/app/${file}`, "utf8");
    if (!/export (async )?function action|export const action/.test(source)) continue;
    if (path!.includes("*")) continue;
    out.push({ path: "/" + path!.replace(/:[A-Za-z]+/g, "1"), file: file! });
  }
  return out;
}

const actions = routesWithActions();
const pageActions = actions.filter((a) => !a.file.startsWith("routes/api."));

describe("a 4xx, not a 500 with a stack trace (issue 12 §7)", () => {
  it("finds the page actions in app/routes.ts", () => {
    // sign-in, sign-out, forgot and reset password, invitations, team switch, the forms of
    // the vehicle, drive-log, team and account pages, and the comment and share resource routes.
    expect(pageActions.map((a) => a.path)).toEqual(
      expect.arrayContaining(["/sign-in", "/sign-out", "/vehicles/1/comments", "/team/switch"]),
    );
  });

  it.each([
    "/vehicles/1/comments?subject=log:1",
    "/vehicles/1/logs/1/share",
    "/vehicles/1/compare/share?logs=3,4",
  ])("anonymous GET %s is a redirect to sign-in with its Location", async (path) => {
    const from = server.output().length;
    const answer = await new HttpClient(server.url).get(path);
    expect(answer.status).toBe(302);
    const location = new URL(answer.headers.get("location")!, server.url);
    expect(location.pathname).toBe("/sign-in");
    expect(decodeURIComponent(location.searchParams.get("redirectTo")!)).toBe(path);
    expectNoStack(from);
  });

  it.each(pageActions.map((a) => a.path))(
    "POST %s without a body, with JSON, or with a boundary-less multipart is 400 with a message",
    async (path) => {
      const from = server.output().length;
      const client = new HttpClient(server.url);
      const bodies: Array<[Record<string, string>, string | undefined]> = [
        [{}, undefined],
        [{ "Content-Type": "application/json" }, "{}"],
      ];
      // The vehicle page's multipart post is the form upload, whose checks are its own.
      if (path !== "/vehicles/1") bodies.push([{ "Content-Type": "multipart/form-data" }, "x"]);
      for (const [headers, body] of bodies) {
        const response = await fetch(server.url + path, {
          method: "POST",
          redirect: "manual",
          headers: { Origin: server.url, "X-Forwarded-For": client.ip, ...headers },
          body,
        });
        const text = await response.text();
        expect(response.status, `${JSON.stringify(headers)}`).toBe(400);
        expect(text).toMatch(/form/);
      }
      expectNoStack(from);
    },
  );

  it.each([
    ["DELETE", "/reset-password/x", "GET, HEAD, POST"],
    ["PUT", "/sign-out", "GET, HEAD, POST"],
    ["PATCH", "/invitations/x", "GET, HEAD, POST"],
    ["OPTIONS", "/sign-in", "GET, HEAD, POST"],
    ["POST", "/healthz", "GET, HEAD"],
  ])("%s %s is 405 with Allow: %s", async (method, path, allow) => {
    const from = server.output().length;
    const response = await fetch(server.url + path, { method, redirect: "manual" });
    expect(response.status).toBe(405);
    expect(response.headers.get("allow")).toBe(allow);
    expectNoStack(from);
  });

  it("an API route without that method answers 405 in the API's JSON shape", async () => {
    const response = await fetch(`${server.url}/api/v1/me`, { method: "DELETE" });
    expect(response.status).toBe(405);
    expect(await response.json()).toEqual({
      error: { code: "method_not_allowed", message: expect.any(String) },
    });
  });
});
