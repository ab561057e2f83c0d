import { apiRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";
import type { Route } from "./+types/share.report";

// Contract stub (issue 16): GET a shared sign-off's evidence report. Filled in by its owner.
export const loader = apiRoute(async (_args: Route.LoaderArgs) => {
  throw new NotFound("Not built yet.");
});
