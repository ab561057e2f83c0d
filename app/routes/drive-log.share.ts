import { idParam } from "~/lib/http/params";
import {
  sharePanelAction,
  sharePanelLoader,
  type SubjectResolver,
} from "~/lib/http/share-actions.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/drive-log.share";

/**
 * /vehicles/:vehicleId/logs/:logId/share — the share panel's resource route (engineer and up).
 * GET: the drive log's share links as JSON { shares }. POST (form, CSRF token): intent create,
 * extend, revoke or email (app/lib/http/share-actions.server.ts).
 */
function subjectOf(params: Route.LoaderArgs["params"]): SubjectResolver {
  return async (current) => {
    const data = vehicleData(current.team.id);
    const { vehicle, log } = await data.vehicleLog(
      idParam(params.vehicleId),
      idParam(params.logId),
    );
    return { kind: "log", vehicleId: vehicle.id, logId: log.id };
  };
}

export function loader({ request, params }: Route.LoaderArgs) {
  return sharePanelLoader(request, subjectOf(params));
}

export function action({ request, params, context }: Route.ActionArgs) {
  return sharePanelAction(request, context, subjectOf(params));
}
