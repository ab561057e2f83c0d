import { storedPreview } from "~/lib/data/channel-preview.server";
import { teamData } from "~/lib/data/team-data.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { channelChoiceSchema } from "~/lib/domain/channel-names";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, pageRoute } from "~/lib/http/edge.server";
import { idParam } from "~/lib/http/params";
import type { Route } from "./+types/drive-log.channel-preview";

/**
 * GET /vehicles/:vehicleId/logs/:logId/channel-preview.json?time=&crank=&gearbox=&crankUnit=&gearboxUnit=
 * → { timeS, crankRpm, gearboxRpm } (null separates sections): the channel chooser's small chart
 * of the picked speeds, read from the stored file with those picks (an empty or missing pick is
 * recognised from the file, as in the analysis). Viewer and up, as charts.json. 400 for a bad
 * query, 422 { error: { code, message } } when the picks cannot be read as speeds.
 */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const { log } = await vehicleData(team.id).vehicleLog(
    idParam(params.vehicleId),
    idParam(params.logId),
  );
  const q = new URL(request.url).searchParams;
  const parsed = channelChoiceSchema.safeParse({
    timeChannel: q.get("time") ?? undefined,
    crankChannel: q.get("crank") ?? undefined,
    gearboxChannel: q.get("gearbox") ?? undefined,
    crankUnit: q.get("crankUnit") ?? undefined,
    gearboxUnit: q.get("gearboxUnit") ?? undefined,
  });
  if (!parsed.success)
    return apiError(400, "invalid_query", parsed.error.issues.map((i) => i.message).join(" "));
  const c = parsed.data;
  const { channelNames } = await teamData(team.id).ingestSettings();
  const preview = await storedPreview(
    log.blobKey,
    {
      time: c.timeChannel,
      crank: c.crankChannel,
      gearbox: c.gearboxChannel,
      crankUnit: c.crankUnit,
      gearboxUnit: c.gearboxUnit,
    },
    channelNames,
  );
  if (!preview.ok) {
    if (/ENOENT/.test(preview.error.message))
      return apiError(
        409,
        "raw_file_missing",
        "The raw file of this drive log is missing from storage.",
      );
    return apiError(
      preview.error.code === "read_failed" ? 500 : 422,
      preview.error.code,
      preview.error.message,
    );
  }
  const { timeS, crankRpm, gearboxRpm } = preview.value;
  return Response.json(
    { timeS, crankRpm, gearboxRpm },
    // The same file and picks always give the same answer; a short private cache saves a refetch.
    { headers: { "Cache-Control": "private, max-age=30" } },
  );
});
