import { createHash } from "node:crypto";
import { attachmentDisposition } from "./raw-file.server";

/**
 * An evidence report as the answer: `application/pdf`, shown in the browser (`inline`) with its
 * file name for saving. A stored report (an approved sign-off's, which never changes) carries a
 * strong ETag, its SHA-256 (RFC 9110 §8.8.3), and a matching If-None-Match gets 304 without the
 * bytes; a draft is made anew on every request and is never cached.
 */
export function pdfResponse(
  request: Request,
  pdf: Buffer,
  fileName: string,
  { stored }: { stored: boolean },
): Response {
  const headers: Record<string, string> = {
    "Content-Type": "application/pdf",
    "Content-Disposition": attachmentDisposition(fileName, {
      type: "inline",
      fallback: "evidence-report.pdf",
    }),
  };
  if (!stored) {
    headers["Cache-Control"] = "no-store";
    return new Response(new Uint8Array(pdf), { headers });
  }
  const etag = `"${createHash("sha256").update(pdf).digest("hex")}"`;
  // Private: the report is the team's, behind its sign-in; revalidate so a revoked access shows.
  headers["Cache-Control"] = "private, no-cache";
  headers.ETag = etag;
  const asked = request.headers.get("If-None-Match");
  if (asked && asked.split(",").some((tag) => tag.trim().replace(/^W\//, "") === etag))
    return new Response(null, { status: 304, headers });
  return new Response(new Uint8Array(pdf), { headers });
}
