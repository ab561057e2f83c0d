import type { z } from "zod";
import { Invalid } from "../domain/errors";

/**
 * An /api/v1 write's JSON body, parsed with the domain's schema. An empty body reads as `{}` (so
 * a schema whose fields are all optional accepts it); a body that is not JSON, or that the schema
 * refuses, is Invalid (400) with `code` and a message that names each field at fault, e.g.
 * `claims.0.logIds: Name at least one drive log that proves the target.` — the edge
 * (edge.server.ts) answers it as `{ error: { code, message } }`.
 */
export async function readJsonBody<S extends z.ZodType>(
  request: Request,
  schema: S,
  refusal: { code: string; example: string },
): Promise<z.output<S>> {
  const text = await request.text();
  let body: unknown = {};
  if (text.trim()) {
    try {
      body = JSON.parse(text);
    } catch {
      throw new Invalid(`The body must be JSON, e.g. ${refusal.example}.`, "invalid_json");
    }
  }
  const parsed = schema.safeParse(body);
  if (parsed.success) return parsed.data;
  const issues = parsed.error.issues.slice(0, 5).map((issue) => {
    const where = issue.path.join(".");
    return where ? `${where}: ${issue.message}` : issue.message;
  });
  const more = parsed.error.issues.length - issues.length;
  throw new Invalid(issues.join(" ") + (more > 0 ? ` (and ${more} more)` : ""), refusal.code);
}
