/**
 * The team's "Trend reference speed" (issue 15): the engine speed at which the damper-health
 * trend reads the isolation. 1500 rpm by default (the column default in migration 0004): above
 * every idle and below most full-load run-ups' ends, so most run-ups cover it (our choice).
 */
import { z } from "zod";

export const TREND_REFERENCE_DEFAULT_RPM = 1500;
export const TREND_REFERENCE_MIN_RPM = 600;
export const TREND_REFERENCE_MAX_RPM = 8000;

const message = `The trend reference speed is a whole number of rpm from ${TREND_REFERENCE_MIN_RPM} to ${TREND_REFERENCE_MAX_RPM}, e.g. ${TREND_REFERENCE_DEFAULT_RPM}.`;

/** The team page's form (a string) and JSON callers (a number) alike. */
export const trendReferenceSchema = z.object({
  referenceRpm: z.preprocess(
    (v) => (v === "" || v === null ? undefined : typeof v === "string" ? Number(v.trim()) : v),
    z
      .number({ error: message })
      .int(message)
      .min(TREND_REFERENCE_MIN_RPM, message)
      .max(TREND_REFERENCE_MAX_RPM, message),
  ),
});
