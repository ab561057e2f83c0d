import { z } from "zod";
import { CAUTIONS } from "./cautions";

/**
 * The export pack's pure parts (docs/export-pack.md): its query, the names of its folders and of
 * the download, the manifest's shape and the README that travels in the zip. The pack itself is
 * written by app/lib/data/export-pack.server.ts.
 */

/** The manifest's `format`: a reader checks it before trusting the layout. */
export const EXPORT_FORMAT = "twistlog-export/1";

/** `?damperVariant=` (optional): only the drive logs recorded with this damper variant. */
export const exportQuerySchema = z.strictObject(
  {
    damperVariant: z
      .string()
      .trim()
      .min(1, "damperVariant is empty: leave it out to export every damper variant.")
      .max(80, "damperVariant has at most 80 characters.")
      .optional(),
  },
  {
    error: (issue) =>
      issue.code === "unrecognized_keys"
        ? `Unknown query parameter ${issue.keys.map((k) => `"${k}"`).join(", ")}: the export takes damperVariant only.`
        : undefined,
  },
);
export type ExportQuery = z.output<typeof exportQuerySchema>;

/** The query of the export URL, or the message that says what is wrong with it. */
export function parseExportQuery(
  params: URLSearchParams,
): { ok: true; query: ExportQuery } | { ok: false; message: string } {
  if (params.getAll("damperVariant").length > 1)
    return { ok: false, message: "Give damperVariant once (one variant per pack)." };
  const parsed = exportQuerySchema.safeParse(Object.fromEntries(params));
  if (parsed.success) return { ok: true, query: parsed.data };
  return { ok: false, message: parsed.error.issues[0]!.message };
}

/** Letters, digits, `.`, `_` and `-` only, no dot or dash in front; at most `max` characters. */
function safePart(text: string, max: number): string {
  return text
    .normalize("NFKD")
    .replace(/[^A-Za-z0-9._-]+/g, "-")
    .replace(/-{2,}/g, "-")
    .replace(/^[-.]+/, "")
    .slice(0, max)
    .replace(/[-.]+$/, "");
}

/**
 * A drive log's folder in the pack, `logs/<logId>-<stem>`: the uploaded file name without its
 * extension, reduced to safe characters (no path separator, nothing a shell or a spreadsheet
 * reads specially in front), e.g. `logs/12-kestrel-run-up-3`. The id keeps it unique.
 */
export function logFolder(logId: number, fileName: string): string {
  const stem = safePart(fileName.replace(/\.[A-Za-z0-9]{1,5}$/, ""), 60);
  return `logs/${logId}-${stem || "drive-log"}`;
}

/** The download's name, e.g. `KST-D4-export-2026-12-02.zip` (`KST-D4-B-export-…` for variant B). */
export function packFileName(identifier: string, at: Date, damperVariant?: string): string {
  const vehicle = safePart(identifier, 40) || "vehicle";
  const variant = damperVariant ? `-${safePart(damperVariant, 40) || "variant"}` : "";
  return `${vehicle}${variant}-export-${at.toISOString().slice(0, 10)}.zip`;
}

/** One file of the pack in the manifest. */
export interface ManifestFile {
  path: string;
  /** Lower-case hex SHA-256 of the file's bytes. */
  sha256: string;
  sizeBytes: number;
}

export interface ManifestLog {
  logId: number;
  folder: string;
  fileName: string;
  damperVariant: string;
  analysisId: number;
  analysisVersion: number;
  firingOrder: number;
}

/** A drive log left out: no finished analysis (its status says why), or one that cannot be read. */
export interface ManifestSkipped {
  logId: number;
  fileName: string;
  damperVariant: string;
  status: string;
  reason: string;
}

export interface Manifest {
  format: typeof EXPORT_FORMAT;
  generatedAt: string;
  software: string;
  vehicle: { id: number; name: string; identifier: string; damperVariant: string };
  /** The damper variant asked for, or null for all. */
  damperVariant: string | null;
  logs: ManifestLog[];
  skipped: ManifestSkipped[];
  /** Every other file of the pack, in the order written. */
  files: ManifestFile[];
}

/** README.md of the pack: the layout, the units, the spreadsheet rule and how to load it. */
export function packReadme(m: Omit<Manifest, "files">, zipName: string): string {
  const v = m.vehicle;
  const scope = m.damperVariant ? `damper variant ${m.damperVariant}` : "all damper variants";
  const contents =
    m.logs.length === 0
      ? `**No analysed drive logs**: no drive log of this vehicle (${scope}) has a finished analysis${
          m.skipped.length
            ? ` (${m.skipped.length} left out, listed under \`skipped\` in manifest.json)`
            : ""
        }. The pack holds vehicle.json, logs.csv (header only) and manifest.json.`
      : `${m.logs.length} analysed drive log${m.logs.length === 1 ? "" : "s"} (${scope}), each with its latest analysis${
          m.skipped.length
            ? `; ${m.skipped.length} without a finished analysis left out (\`skipped\` in manifest.json)`
            : ""
        }.`;
  const first = m.logs[0]?.folder ?? "logs/12-run-up-3";
  return `# Twistlog export pack: ${v.identifier}

Vehicle **${v.name}** (${v.identifier}), exported ${m.generatedAt} by ${m.software}.
Format \`${m.format}\`. ${contents}

## Layout

\`\`\`text
manifest.json           format, vehicle, the drive logs exported and left out, and every
                        other file with its SHA-256 and size in bytes
vehicle.json            the vehicle as GET /api/v1/vehicles/:id gives it
logs.csv                one row per exported drive log: id, folder, file name, test details,
                        analysis id and version, firing order
README.md               this file
logs/<id>-<name>/
  isolation.csv         the isolation curve at the firing order, one row per engine-speed bin
  order-curves.csv      every tracked order, long format: one row per (order, bin)
  result.json           the analysis result exactly as GET /api/v1/logs/:id/result serves it
  source.json           the raw file (name, SHA-256, size), who uploaded it and when, the test
                        details, the analysis (id, version, date, settings) and the file's
                        channels, units and repairs
\`\`\`

## Units

The CSV files have one header row; every column's unit is in its name, in SI units.

- \`engine_speed [rad/s]\`: the engine-speed bin's centre, rad/s (rpm = rad/s × 60 / 2π).
- \`crank_amplitude [rad/s]\`, \`gearbox_amplitude [rad/s]\`: 0-peak amplitude of the order's
  angular-velocity fluctuation at the crank and at the gearbox input, rad/s.
- \`isolation [dB]\`: 20·log10(crank amplitude / gearbox amplitude) at the firing order; positive
  means the damper attenuates.
- \`order\`: per crank revolution (dimensionless). \`blocks\`: measurements averaged in the bin.
  \`above_noise\`: false when the gearbox amplitude is under 5× its noise floor (the dB is then a
  lower bound). \`method\`: \`blocks\` or \`filter\`.

result.json keeps the result's own units (engine speed and amplitudes in rpm, as its field names
say). The numbers in the CSV files are the result's, converted (× 2π/60) and written in full.

## Spreadsheets

A text cell that begins with \`=\`, \`+\`, \`-\`, \`@\`, a tab, a line break or NUL (OWASP "CSV
Injection") is written with an apostrophe in front, so that a spreadsheet shows it as text and runs
nothing; numbers are never changed. Text that people typed (file names, notes) is only in logs.csv. Remove the
apostrophe in a script with \`.str.removeprefix("'")\` when you need the text as typed.

## Load it with pandas

\`\`\`python
import hashlib, json, math, zipfile
import pandas as pd

z = zipfile.ZipFile("${zipName}")
manifest = json.load(z.open("manifest.json"))
assert manifest["format"] == "${m.format}"
for f in manifest["files"]:  # every file is as it was written
    data = z.read(f["path"])
    assert len(data) == f["sizeBytes"], f["path"]
    assert hashlib.sha256(data).hexdigest() == f["sha256"], f["path"]

logs = pd.read_csv(z.open("logs.csv"))
iso = pd.read_csv(z.open("${first}/isolation.csv"))
iso["engine_speed [rpm]"] = iso["engine_speed [rad/s]"] * 60 / (2 * math.pi)
curves = pd.read_csv(z.open("${first}/order-curves.csv"))
firing = curves[curves["order"] == ${m.logs[0]?.firingOrder ?? 2}]
\`\`\`

Each file traces to its drive log, analysis version and settings through source.json and
manifest.json.

## Cautions (as in the evidence report)

${CAUTIONS.map((c) => `- ${c}`).join("\n")}
`;
}
