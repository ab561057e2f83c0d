/**
 * The start/stop events and the two-mass model fit of stored analyses, read from the result JSON
 * (only its main part, not the order map) and kept by analysis id: the targets need each event
 * (the analyses row keeps only the largest figures), and analyses saved before issue 15 have no
 * model columns. A saved analysis never changes, so what is read stays true.
 */
import { and, eq, inArray } from "drizzle-orm";
import { gunzipSync } from "node:zlib";
import { z } from "zod";
import { analyses } from "~/lib/infra/db/schema-drive-logs";
import { analysisResultSchema } from "~/lib/signal";
import { Lru } from "../base/lru";
import { db } from "../infra/db.server";
import type { EventFigure } from "../domain/event-figures";

export interface TransientFigures {
  /** The events; null when the result was stored before events were detected (re-analyse). */
  events: EventFigure[] | null;
  model: { naturalFrequencyHz: number; dampingRatio: number } | null;
}

const figuresSchema = z.object({
  events: analysisResultSchema.shape.events,
  model: analysisResultSchema.shape.model.optional(),
});

const kept = new Lru<number, TransientFigures>(20_000);

/** The figures of these analyses of the team; an unreadable result is left out. */
export async function transientFiguresOf(
  teamId: number,
  analysisIds: readonly number[],
): Promise<Map<number, TransientFigures>> {
  const out = new Map<number, TransientFigures>();
  const missing: number[] = [];
  for (const id of new Set(analysisIds)) {
    const known = kept.get(id);
    if (known) out.set(id, known);
    else missing.push(id);
  }
  for (let i = 0; i < missing.length; i += 50) {
    const rows = await db
      .select({ id: analyses.id, resultGz: analyses.resultGz })
      .from(analyses)
      .where(and(inArray(analyses.id, missing.slice(i, i + 50)), eq(analyses.teamId, teamId)));
    for (const row of rows) {
      const parsed = figuresSchema.safeParse(JSON.parse(gunzipSync(row.resultGz).toString("utf8")));
      if (!parsed.success) continue;
      const { events, model } = parsed.data;
      const figures: TransientFigures = {
        events:
          events?.map((e) => ({
            kind: e.kind,
            startS: e.startS,
            peakAmplificationDb: e.peakAmplificationDb,
            twistPeakToPeakDeg: e.twistPeakToPeakDeg,
            resonanceRpm: e.resonanceRpm,
          })) ?? null,
        model: model
          ? { naturalFrequencyHz: model.naturalFrequencyHz, dampingRatio: model.dampingRatio }
          : null,
      };
      kept.set(row.id, figures);
      out.set(row.id, figures);
    }
  }
  return out;
}
