import { createHash } from "node:crypto";
import { Readable } from "node:stream";
import { and, asc, eq } from "drizzle-orm";
import yazl from "yazl";
import { users } from "~/lib/infra/db/schema";
import { analyses, driveLogs } from "~/lib/infra/db/schema-drive-logs";
import { analysisResultSchema, type AnalysisResult } from "~/lib/signal";
import { decodeStoredJson } from "../analyses/result.server";
import { db } from "../infra/db.server";
import { softwareVersion } from "../infra/software-version.server";
import { NotFound } from "../domain/errors";
import {
  isolationCsv,
  orderCurvesCsv,
  packIndexCsv,
  type PackIndexRow,
} from "../domain/export-csv";
import {
  EXPORT_FORMAT,
  logFolder,
  packFileName,
  packReadme,
  type Manifest,
  type ManifestFile,
  type ManifestLog,
  type ManifestSkipped,
} from "../domain/export-pack";
import type { Vehicle } from "./vehicles.server";

/**
 * The export pack of a vehicle (docs/export-pack.md): a zip written while it is sent. The drive
 * logs are listed first (so a wrong vehicle or a database outage is an answer, not a broken
 * download); then each analysed log's four files are made from its latest analysis and handed
 * to the zip only once the zip has written everything before them, so at most two logs' files
 * are in memory whatever the vehicle holds. The manifest, with every file's SHA-256, comes last.
 */
export interface ExportPack {
  fileName: string;
  /** The zip's bytes, produced as they are read. */
  stream: Readable;
}

export async function openExportPack(args: {
  teamId: number;
  vehicle: Vehicle;
  /** vehicle.json: the vehicle as API v1 gives it. */
  vehicleJson: unknown;
  damperVariant?: string;
}): Promise<ExportPack> {
  const { teamId, vehicle } = args;
  const all = await listLogs(teamId, vehicle.id);
  const variant = args.damperVariant;
  const rows = variant ? all.filter((r) => r.damperVariant === variant) : all;
  if (variant && rows.length === 0) {
    const known = [...new Set(all.map((r) => r.damperVariant))].sort();
    throw new NotFound(
      `Vehicle ${vehicle.identifier} has no drive logs with damper variant "${variant}"${
        known.length ? `; its drive logs have ${known.map((k) => `"${k}"`).join(", ")}` : ""
      }.`,
      "no_such_variant",
    );
  }

  const at = new Date();
  const fileName = packFileName(vehicle.identifier, at, variant);
  const zip = new yazl.ZipFile();
  const out = zip.outputStream as Readable;
  let gone = false;
  const stopped = new Promise<void>((resolve) =>
    out.once("close", () => {
      gone = true;
      resolve();
    }),
  );
  zip.on("error", (error: Error) => out.destroy(error));

  const files: ManifestFile[] = [];
  const addNow = (path: string, data: Buffer) => {
    files.push(fileEntry(path, data));
    zip.addBuffer(data, path, { mtime: at });
  };
  const logs: ManifestLog[] = [];
  const skipped: ManifestSkipped[] = [];
  const index: PackIndexRow[] = [];

  async function write() {
    addNow("vehicle.json", jsonBytes(args.vehicleJson));
    for (const row of rows) {
      if (gone) return;
      const made = row.analysisId ? await logFiles(teamId, row) : { skip: notAnalysed(row) };
      if ("skip" in made) {
        skipped.push({
          logId: row.id,
          fileName: row.fileName,
          damperVariant: row.damperVariant,
          status: row.status,
          reason: made.skip,
        });
        continue;
      }
      logs.push({
        logId: row.id,
        folder: made.folder,
        fileName: row.fileName,
        damperVariant: row.damperVariant,
        analysisId: row.analysisId!,
        analysisVersion: row.analysisVersion!,
        firingOrder: made.firingOrder,
      });
      index.push({
        logId: row.id,
        folder: made.folder,
        fileName: row.fileName,
        condition: row.condition,
        gear: row.gear,
        damperVariant: row.damperVariant,
        testDate: row.testDate,
        uploadedAt: row.uploadedAt.toISOString(),
        analysisId: row.analysisId!,
        analysisVersion: row.analysisVersion!,
        firingOrder: made.firingOrder,
        notes: row.notes,
      });
      for (const f of made.files) files.push(fileEntry(f.path, f.data!));
      await Promise.race([addWhenReached(zip, made.files, at), stopped]);
    }
    if (gone) return;
    const head: Omit<Manifest, "files"> = {
      format: EXPORT_FORMAT,
      generatedAt: at.toISOString(),
      software: softwareVersion(),
      vehicle: {
        id: vehicle.id,
        name: vehicle.name,
        identifier: vehicle.identifier,
        damperVariant: vehicle.damperVariant,
      },
      damperVariant: variant ?? null,
      logs,
      skipped,
    };
    addNow("logs.csv", Buffer.from(packIndexCsv(index)));
    addNow("README.md", Buffer.from(packReadme(head, fileName)));
    const manifest: Manifest = { ...head, files: [...files] };
    zip.addBuffer(jsonBytes(manifest), "manifest.json", { mtime: at });
    zip.end();
  }
  write().catch((error: unknown) => {
    // The answer has started: all that is left is to break it off, so the download is
    // incomplete (a zip without its central directory, which every reader refuses).
    console.error(
      `export pack of vehicle ${vehicle.id} broken off: ${error instanceof Error ? error.message : String(error)}`,
    );
    out.destroy(error instanceof Error ? error : new Error(String(error)));
  });
  return { fileName, stream: out };
}

type LogRow = Awaited<ReturnType<typeof listLogs>>[number];

/** The vehicle's drive logs in upload order, each with its latest analysis' row (no result). */
function listLogs(teamId: number, vehicleId: number) {
  return db
    .select({
      id: driveLogs.id,
      fileName: driveLogs.fileName,
      blobKey: driveLogs.blobKey,
      sizeBytes: driveLogs.sizeBytes,
      condition: driveLogs.condition,
      gear: driveLogs.gear,
      damperVariant: driveLogs.damperVariant,
      testDate: driveLogs.testDate,
      notes: driveLogs.notes,
      uploadedAt: driveLogs.uploadedAt,
      uploadedBy: users.name,
      status: driveLogs.status,
      error: driveLogs.error,
      analysisId: analyses.id,
      analysisVersion: analyses.version,
      analysisCreatedAt: analyses.createdAt,
      analysisSettings: analyses.settings,
    })
    .from(driveLogs)
    .leftJoin(users, eq(users.id, driveLogs.uploadedBy))
    .leftJoin(
      analyses,
      and(eq(analyses.id, driveLogs.latestAnalysisId), eq(analyses.teamId, teamId)),
    )
    .where(and(eq(driveLogs.vehicleId, vehicleId), eq(driveLogs.teamId, teamId)))
    .orderBy(asc(driveLogs.id));
}

function notAnalysed(row: LogRow): string {
  if (row.status === "failed")
    return `Its analysis failed${row.error ? `: ${row.error.message}` : ""}.`;
  if (row.status === "analysing") return "It is being analysed; export again when it is done.";
  if (row.status === "queued") return "It waits for its analysis; export again when it is done.";
  return "It has no finished analysis.";
}

interface PackFile {
  path: string;
  /** Dropped once handed to the zip (the zip keeps its entries to the end). */
  data: Buffer | null;
}

/** A drive log's four files from its latest analysis, or why it is left out. */
async function logFiles(
  teamId: number,
  row: LogRow,
): Promise<{ folder: string; firingOrder: number; files: PackFile[] } | { skip: string }> {
  const [stored] = await db
    .select({ resultGz: analyses.resultGz, orderMapGz: analyses.orderMapGz })
    .from(analyses)
    .where(and(eq(analyses.id, row.analysisId!), eq(analyses.teamId, teamId)));
  if (!stored) return { skip: "It was deleted while the pack was being written." };
  // The result exactly as GET /api/v1/logs/:logId/result serves it (the one decoder).
  const json = decodeStoredJson(stored);
  const parsed = analysisResultSchema.safeParse(json);
  if (!parsed.success)
    return { skip: "Its stored result cannot be read by this version: analyse it again." };
  const result = parsed.data;
  const folder = logFolder(row.id, row.fileName);
  const file = (name: string, text: string) => ({
    path: `${folder}/${name}`,
    data: Buffer.from(text),
  });
  return {
    folder,
    firingOrder: result.firingOrder,
    files: [
      file("isolation.csv", isolationCsv(result)),
      file("order-curves.csv", orderCurvesCsv(result)),
      file("result.json", JSON.stringify(json)),
      { path: `${folder}/source.json`, data: jsonBytes(sourceOf(row, result)) },
    ],
  };
}

/** source.json: where the numbers came from. */
function sourceOf(row: LogRow, result: AnalysisResult) {
  const s = result.source;
  return {
    driveLog: {
      id: row.id,
      fileName: row.fileName,
      /** The storage key is the SHA-256 of the uploaded bytes (app/lib/infra/storage.server.ts). */
      sha256: row.blobKey,
      sizeBytes: row.sizeBytes,
      uploadedAt: row.uploadedAt.toISOString(),
      uploadedBy: row.uploadedBy,
      testDate: row.testDate,
      condition: row.condition,
      gear: row.gear,
      damperVariant: row.damperVariant,
      notes: row.notes,
    },
    analysis: {
      id: row.analysisId,
      version: row.analysisVersion,
      createdAt: row.analysisCreatedAt?.toISOString() ?? null,
      firingOrder: result.firingOrder,
      settings: row.analysisSettings,
    },
    source: s
      ? {
          format: s.format,
          channels: s.channels,
          units: s.units,
          metadata: s.metadata,
          repairs: s.repairs.map(({ code, message, count, fromS, toS }) => ({
            code,
            message,
            count,
            fromS,
            toS,
          })),
          sections: s.sections,
        }
      : null,
  };
}

/**
 * Adds the files as zip entries whose bytes the zip asks for when it reaches them; resolves when
 * it asks for the first one, that is once everything added before has been written out (a
 * stream's pipe waits for the reader), so the next log is made only then.
 */
function addWhenReached(zip: yazl.ZipFile, entries: PackFile[], mtime: Date): Promise<void> {
  return new Promise((reached) => {
    entries.forEach((entry, i) => {
      zip.addReadStreamLazy(entry.path, { mtime, size: entry.data!.length }, (give) => {
        if (i === 0) reached();
        const data = entry.data!;
        entry.data = null;
        give(null, Readable.from([data]));
      });
    });
  });
}

function fileEntry(path: string, data: Buffer): ManifestFile {
  return { path, sha256: createHash("sha256").update(data).digest("hex"), sizeBytes: data.length };
}

function jsonBytes(value: unknown): Buffer {
  return Buffer.from(JSON.stringify(value, null, 2) + "\n");
}
