import { UNSAFE_ErrorResponseImpl as ErrorResponse } from "react-router";
import { afterEach, describe, expect, it, vi } from "vitest";
import { handleError } from "~/entry.server";

// app/entry.server.tsx handleError: which errors reach the log, and how (issue 12 §7, §8).
const token = "Qm9vdHN0cmFwLXRva2VuLWZvci10ZXN0aW5nLW9ubHk"; // 43 characters, as newSecret() makes

function logged(error: unknown, request = new Request(`http://x/s/${token}`, { method: "POST" })) {
  const spy = vi.spyOn(console, "error").mockImplementation(() => {});
  handleError(error, { request, params: {}, context: {} as never });
  return spy.mock.calls.map((args) => args.join(" "));
}

afterEach(() => vi.restoreAllMocks());

describe("handleError", () => {
  it("logs nothing for an expected 4xx (thrown Response, router 404/405)", () => {
    expect(logged(new Response("Not found", { status: 404 }))).toEqual([]);
    const routerError = new Error(
      `You made a POST request to "/s/${token}" but did not provide an action`,
    );
    expect(logged(new ErrorResponse(405, "Method Not Allowed", routerError, true))).toEqual([]);
  });

  it("logs nothing for a request the client abandoned", () => {
    const controller = new AbortController();
    controller.abort();
    const request = new Request(`http://x/s/${token}`, { signal: controller.signal });
    expect(logged(new Error("boom"), request)).toEqual([]);
  });

  it("logs a bug with its stack, the path and message redacted", () => {
    const lines = logged(new Error(`could not load /s/${token}/file`));
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(
      /^500 POST \/s\/\[redacted\]: Error: could not load \/s\/\[redacted\]\/file\n\s+at /,
    );
    expect(lines[0]).not.toContain(token);
  });

  it("logs a database outage as one line without a stack", () => {
    const outage = Object.assign(new Error("Failed query: select 1\nparams: x"), {
      cause: Object.assign(new Error("connect ECONNREFUSED"), { code: "ECONNREFUSED" }),
    });
    const lines = logged(outage, new Request(`http://x/reset-password/${token}`));
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^503 GET \/reset-password\/\[redacted\]: No database answers at /);
    expect(lines[0]).not.toMatch(/\n/);
  });
});
