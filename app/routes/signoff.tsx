import { pageRoute } from "~/lib/http/edge.server";
import { NotFound } from "~/lib/domain/errors";
import type { Route } from "./+types/signoff";

// Contract stub (issue 16): one sign-off: evidence, history, decisions. Filled in by its owner.
export const loader = pageRoute(async (_args: Route.LoaderArgs) => {
  throw new NotFound("Not built yet.");
});

export default function Stub() {
  return null;
}
