import { idParam } from "~/lib/http/params";
import { channelJson, storedChannels } from "~/lib/data/channel-list.server";
import { teamData } from "~/lib/data/team-data.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/api.v1.log-channels";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

/**
 * GET /api/v1/logs/:logId/channels → { channels: [{ name, unit, group, sampleRateHz, samples,
 * min, max, role }] } (role: "time" | "crank" | "gearbox" | null), the same access as the log.
 * A file whose channels cannot be listed is 422 with the reader's code.
 */
export const loader = apiRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { teamId } = await requireAccess(request, "viewer", { from: "api" });
  const log = await vehicleData(teamId).log(idParam(params.logId));
  const { channelNames } = await teamData(teamId).ingestSettings();
  const listed = await storedChannels(log.blobKey, channelNames);
  if (!listed.ok) {
    // The server's paths are nobody's business: a lost file is said in plain words.
    if (/ENOENT/.test(listed.error.message))
      return apiError(
        409,
        "raw_file_missing",
        "The raw file of this drive log is missing from storage.",
      );
    return apiError(422, listed.error.code, listed.error.message);
  }
  return Response.json(
    { channels: listed.value.map(channelJson) },
    { headers: { "Cache-Control": "no-store" } },
  );
});
