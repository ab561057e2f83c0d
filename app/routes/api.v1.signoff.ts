import { apiRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";
import type { Route } from "./+types/api.v1.signoff";

// Contract stub (issue 16): GET one sign-off. Filled in by its owner.
export const loader = apiRoute(async (_args: Route.LoaderArgs) => {
  throw new NotFound("Not built yet.");
});
