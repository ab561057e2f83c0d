import { z } from "zod";

/** Digits only, as idParam() reads ids in paths: "1e3" or "0x10" is no id. */
const analysisId = z
  .string()
  .regex(/^\d{1,15}$/)
  .transform(Number)
  .pipe(z.number().int().positive());

/**
 * `?analysis=<id>`: an earlier analysis version of a drive log (its page and its charts.json).
 * undefined without the parameter, null when it is not an id (the routes answer 404).
 */
export function analysisParam(request: Request): number | null | undefined {
  const value = new URL(request.url).searchParams.get("analysis");
  if (value === null || value === "") return undefined;
  const parsed = analysisId.safeParse(value);
  return parsed.success ? parsed.data : null;
}
