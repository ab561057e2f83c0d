/**
 * The settings of "re-analyse all" (issue 17): the same three a re-analysis of one drive log may
 * change (./reanalyse-form), plus an optional damper variant. One schema for the vehicle page's
 * panel (./reanalyse-all) and one for the API's JSON body (app/routes/api.v1.vehicle-reanalyse.ts).
 */
import { z } from "zod";
import { reanalyseSettings } from "./reanalyse-form";

const damperVariant = z.preprocess(
  (v) => (typeof v === "string" && v.trim() === "" ? undefined : v),
  z
    .string({ error: "The damper variant is a text, e.g. “A”." })
    .trim()
    .max(80, "A damper variant has at most 80 characters.")
    .optional(),
);

/** The vehicle page's form (intent reanalyse-all); an empty variant means every drive log. */
export const reanalyseAllSchema = z.object({
  intent: z.literal("reanalyse-all"),
  ...reanalyseSettings,
  damperVariant,
});

/** POST /api/v1/vehicles/:vehicleId/reanalyse: the same fields as JSON; unknown fields refused. */
export const reanalyseAllBodySchema = z.strictObject({ ...reanalyseSettings, damperVariant });

/** What the API and the panel's route answer once the batch is queued. */
export interface QueuedBatchJson {
  batchId: string;
  jobs: { jobId: number; driveLogId: number }[];
}
