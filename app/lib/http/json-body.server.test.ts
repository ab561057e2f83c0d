import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { approveSchema, signoffInputSchema } from "../domain/signoff";
import { readJsonBody } from "./json-body.server";
import { pdfResponse } from "./pdf-response.server";

const post = (body: string) => new Request("http://x/api", { method: "POST", body });
const refusal = { code: "invalid_signoff", example: '{"damperVariant": "A"}' };

describe("readJsonBody", () => {
  it("reads an empty body as {} and fills the schema's defaults", async () => {
    expect(await readJsonBody(post(""), approveSchema, refusal)).toEqual({ comment: "" });
  });

  it("refuses text that is not JSON with invalid_json and an example", async () => {
    await expect(readJsonBody(post("{comment:"), approveSchema, refusal)).rejects.toMatchObject({
      status: 400,
      code: "invalid_json",
      message: 'The body must be JSON, e.g. {"damperVariant": "A"}.',
    });
  });

  it("names each field at fault with the schema's words, under the route's code", async () => {
    const body = JSON.stringify({ damperVariant: "A", claims: [{ targetId: 3, logIds: [] }] });
    await expect(readJsonBody(post(body), signoffInputSchema, refusal)).rejects.toMatchObject({
      status: 400,
      code: "invalid_signoff",
      message: "claims.0.logIds: Name at least one drive log that proves the target.",
    });
  });
});

describe("pdfResponse", () => {
  const pdf = Buffer.from("%PDF-1.7 not really");
  // The strong validator is the SHA-256 of the bytes (RFC 9110 §8.8.3), computed here by node:crypto.
  const etag = `"${createHash("sha256").update(pdf).digest("hex")}"`;

  it("serves a stored report inline with its SHA-256 as ETag, and 304 for a matching If-None-Match", async () => {
    const first = pdfResponse(new Request("http://x/r.pdf"), pdf, "KST-D4-A-signoff-7.pdf", {
      stored: true,
    });
    expect(first.status).toBe(200);
    expect(first.headers.get("Content-Type")).toBe("application/pdf");
    expect(first.headers.get("Content-Disposition")).toBe(
      `inline; filename="KST-D4-A-signoff-7.pdf"; filename*=UTF-8''KST-D4-A-signoff-7.pdf`,
    );
    expect(first.headers.get("ETag")).toBe(etag);
    expect(Buffer.from(await first.arrayBuffer()).equals(pdf)).toBe(true);
    const again = pdfResponse(
      new Request("http://x/r.pdf", { headers: { "If-None-Match": `"other", ${etag}` } }),
      pdf,
      "r.pdf",
      { stored: true },
    );
    expect(again.status).toBe(304);
  });

  it("never caches a draft and gives it no ETag", () => {
    const draft = pdfResponse(
      new Request("http://x/r.pdf", { headers: { "If-None-Match": etag } }),
      pdf,
      "测试.pdf",
      { stored: false },
    );
    expect(draft.status).toBe(200);
    expect(draft.headers.get("ETag")).toBeNull();
    expect(draft.headers.get("Cache-Control")).toBe("no-store");
    expect(draft.headers.get("Content-Disposition")).toMatch(
      /^inline; filename="evidence-report.pdf"; /,
    );
  });
});
