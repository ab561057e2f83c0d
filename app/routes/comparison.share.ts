import { parseLogIds } from "~/lib/data/curves.server";
import { idParam } from "~/lib/http/params";
import { invariantResponse } from "~/lib/http/permissions.server";
import {
  sharePanelAction,
  sharePanelLoader,
  type SubjectResolver,
} from "~/lib/http/share-actions.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/comparison.share";

/**
 * /vehicles/:vehicleId/compare/share?logs=ID,ID… — the share panel's resource route for a
 * comparison (engineer and up): GET lists the links of exactly this comparison, POST (form
 * with `logs`, CSRF token) creates, extends, revokes or e-mails, as for a drive log.
 */
function subjectOf(request: Request, params: Route.LoaderArgs["params"]): SubjectResolver {
  return async (current, form) => {
    const data = vehicleData(current.team.id);
    const vehicle = await data.vehicle(idParam(params.vehicleId));
    const raw = form?.get("logs") ?? new URL(request.url).searchParams.get("logs");
    const ids = parseLogIds(typeof raw === "string" ? raw : null);
    invariantResponse(
      ids && ids.length >= 2,
      "A comparison has 2 to 8 drive-log ids, separated by commas.",
      {
        status: 400,
      },
    );
    for (const id of ids) {
      const log = await data.log(id);
      invariantResponse(
        log.vehicleId === vehicle.id,
        `Drive log ${id} is not one of this vehicle's.`,
        {
          status: 404,
        },
      );
    }
    return { kind: "comparison", vehicleId: vehicle.id, logIds: ids };
  };
}

export function loader({ request, params }: Route.LoaderArgs) {
  return sharePanelLoader(request, subjectOf(request, params));
}

export function action({ request, params, context }: Route.ActionArgs) {
  return sharePanelAction(request, context, subjectOf(request, params));
}
