/**
 * The drive-log page's channel actions: the channel chooser's `map` (pick the channels, remember
 * them for the vehicle, analyse again) and `use-file-details` (the file's own date and comment
 * as test details). Kept here so the page module stays a page.
 */
import { data } from "react-router";
import { queueAnalysis } from "../analyses/requests.server";
import { storedChannels } from "../data/channel-list.server";
import { readPreview } from "../data/drive-log-preview.server";
import { teamData } from "../data/team-data.server";
import type { DriveLogRow, Vehicle, vehicleData } from "../data/vehicles.server";
import { channelChoiceSchema, choiceMapping } from "../domain/channel-names";
import type { IngestMapping, LogError } from "../domain/drive-log-terms";
import { Conflict } from "../domain/errors";
import { metadataDetails } from "../signal/metadata-details.ts";
import { blobStore } from "../infra/storage-settings.server";
import { sniffFormat } from "../signal/format.ts";
import { canChooseColumnsFor } from "../domain/column-reasons";
import { moreCandidatesThanRoles } from "../domain/channel-candidates";

type Vehicles = ReturnType<typeof vehicleData>;

/** The file's format, from its first bytes (the stored copy is gzip: read through the store). */
export async function storedFormat(blobKey: string): Promise<"csv" | "mdf4"> {
  const stream = blobStore().read(blobKey);
  try {
    let head = Buffer.alloc(0);
    for await (const chunk of stream) {
      head = Buffer.concat([head, chunk as Buffer]);
      if (head.length >= 8) break;
    }
    return sniffFormat(head);
  } catch {
    return "csv";
  } finally {
    stream.destroy();
  }
}

/** The names a choice may use: the channel list's, else (a CSV the list cannot read) the header. */
async function channelNamesOf(teamId: number, blobKey: string): Promise<string[] | null> {
  const { channelNames } = await teamData(teamId).ingestSettings();
  const listed = await storedChannels(blobKey, channelNames);
  if (listed.ok) return listed.value.map((c) => c.name);
  if ((await storedFormat(blobKey)) === "mdf4") return null;
  return (await readPreview(blobKey, 0)).header;
}

/** The chooser is offered for a column failure, or for a file with more channels than roles. */
export async function chooserOffered(teamId: number, log: DriveLogRow): Promise<boolean> {
  if (log.status === "failed" && log.error && canChooseColumnsFor(log.error as LogError))
    return true;
  if (log.status !== "done" && log.status !== "failed") return false;
  const { channelNames } = await teamData(teamId).ingestSettings();
  const listed = await storedChannels(log.blobKey, channelNames);
  return listed.ok && moreCandidatesThanRoles(listed.value);
}

/** The choice as posted: the chooser's names (timeChannel, …) or the older form's (timeColumn, …). */
function postedChoice(form: FormData) {
  const get = (a: string, b: string) => {
    const v = form.get(a) ?? form.get(b);
    return typeof v === "string" ? v : undefined;
  };
  return channelChoiceSchema.safeParse({
    timeChannel: get("timeChannel", "timeColumn"),
    crankChannel: get("crankChannel", "crankColumn"),
    gearboxChannel: get("gearboxChannel", "gearboxColumn"),
    crankUnit: get("crankUnit", "crankUnit"),
    gearboxUnit: get("gearboxUnit", "gearboxUnit"),
  });
}

const refused = (error: Record<string, string[]>) =>
  data({ map: { status: "error" as const, error } }, { status: 400 });

export async function chooseChannels(
  teamId: number,
  vehicles: Vehicles,
  vehicle: Vehicle,
  log: DriveLogRow,
  form: FormData,
) {
  // Only the page's offer may be taken; otherwise a post would overwrite the vehicle's
  // remembered columns from a log that read fine with the file's own names.
  if (!(await chooserOffered(teamId, log)))
    throw new Conflict(
      "The columns can be chosen only for a drive log that could not be read because of its columns, or whose file holds more channels than the analysis needs; this one is not in that state, so nothing was changed.",
    );
  const parsed = postedChoice(form);
  if (!parsed.success) {
    const error: Record<string, string[]> = {};
    for (const i of parsed.error.issues) (error[String(i.path[0] ?? "")] ??= []).push(i.message);
    return refused(error);
  }
  const names = await channelNamesOf(teamId, log.blobKey);
  const error: Record<string, string[]> = {};
  if (names)
    for (const key of ["timeChannel", "crankChannel", "gearboxChannel"] as const) {
      const name = parsed.data[key];
      if (name !== undefined && !names.includes(name))
        error[key] = [`The file has no column “${name}”.`];
    }
  if (Object.keys(error).length) return refused(error);
  const timeUnit = form.get("timeUnit");
  const mapping: IngestMapping = {
    ...(choiceMapping(parsed.data) ?? {}),
    ...(timeUnit === "s" || timeUnit === "ms" ? { timeUnit } : {}),
  };
  await vehicles.rememberMapping(vehicle.id, mapping);
  await queueAnalysis(await vehicles.reanalysisJob(log.id, {}, mapping));
  return {
    notice:
      "The channels are set and remembered for this vehicle; the drive log is being analysed again.",
  };
}

/** The file's date and comment where the drive log's test date and notes are empty. */
export function fileDetailsOffer(
  source: { metadata: { key: string; value: string }[] } | undefined,
  log: { testDate: string | null; notes: string },
) {
  if (!source) return {};
  const d = metadataDetails(source.metadata);
  return {
    ...(d.date && !log.testDate ? { date: d.date } : {}),
    ...(d.comment && !log.notes ? { comment: d.comment } : {}),
  };
}

export async function useFileDetails(vehicles: Vehicles, log: DriveLogRow) {
  const analysis = await vehicles.latestAnalysis(log.id);
  const offer = fileDetailsOffer(analysis?.result.source, log);
  if (!offer.date && !offer.comment)
    throw new Conflict("The file offers no date or comment for empty test details.");
  const set = await vehicles.fillTestDetails(log.id, {
    testDate: offer.date,
    notes: offer.comment,
  });
  const took = [set.date ? "date" : null, set.notes ? "comment" : null].filter(Boolean);
  return {
    notice: took.length
      ? `The file's ${took.join(" and ")} ${took.length > 1 ? "are" : "is"} now the drive log's test details.`
      : "Nothing changed: the test details were filled meanwhile.",
  };
}
