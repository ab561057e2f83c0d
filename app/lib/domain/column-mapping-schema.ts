import { z } from "zod";

// The column-mapping form (one schema for the browser's hints and the action) and the preview
// of a file's first rows that it is shown beside (lib/data/drive-log-preview.server.ts).

export const speedUnits = ["rpm", "rad/s", "deg/s", "rev/s"] as const;
const blank = (v: unknown) => (v === "" ? undefined : v);
const column = z.preprocess(blank, z.string().max(200).optional());

export const mappingSchema = z.object({
  intent: z.literal("map"),
  timeColumn: column,
  crankColumn: column,
  gearboxColumn: column,
  timeUnit: z.preprocess(blank, z.enum(["s", "ms"]).optional()),
  crankUnit: z.preprocess(blank, z.enum(speedUnits).optional()),
  gearboxUnit: z.preprocess(blank, z.enum(speedUnits).optional()),
});

export interface Preview {
  header: string[];
  rows: string[][];
}
