import { apiRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";
import type { Route } from "./+types/api.v1.vehicle-signoffs";

// Contract stub (issue 16): GET the vehicle's sign-offs, POST a proposal. Filled in by its owner.
export const loader = apiRoute(async (_args: Route.LoaderArgs) => {
  throw new NotFound("Not built yet.");
});
