import { rawFileResponse } from "~/lib/http/raw-file.server";
import {
  shareForJson,
  shareHeaders,
  shareJsonError,
  sharedLogFor,
} from "~/lib/http/share-link.server";
import type { Route } from "./+types/share.file";
import { pageRoute } from "~/lib/http/edge.server";

/**
 * GET /s/:token/file[?log=ID]: the raw drive log, only when the sharer allowed it (403
 * otherwise), and only a drive log of the share (404 for any other).
 */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const active = await shareForJson(params.token);
  if (active instanceof Response) return active;
  if (!active.share.allowRawDownload)
    return shareJsonError(
      403,
      "forbidden",
      "The person who shared this did not allow downloading the raw file.",
    );
  const log = await sharedLogFor(active, request);
  if (log instanceof Response) return log;
  return rawFileResponse(log, shareHeaders);
});
