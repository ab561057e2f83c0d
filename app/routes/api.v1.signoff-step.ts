import { apiRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";
import type { Route } from "./+types/api.v1.signoff-step";

// Contract stub (issue 16): POST approve | reject | withdraw. Filled in by its owner.
export const loader = apiRoute(async (_args: Route.LoaderArgs) => {
  throw new NotFound("Not built yet.");
});
