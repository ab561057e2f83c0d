import { idParam } from "~/lib/http/params";
import {
  sharePanelAction,
  sharePanelLoader,
  type SubjectResolver,
} from "~/lib/http/share-panel.server";
import { vehicleData } from "~/lib/data/vehicles.server";

/**
 * /vehicles/:vehicleId/logs/:logId/share — the share panel's resource route (engineer and up).
 * GET: the drive log's share links as JSON { shares }. POST (form, CSRF token): intent create,
 * extend, revoke or email (app/lib/http/share-panel.server.ts).
 */
const subjectOf: SubjectResolver = async ({ params }, access) => {
  const data = vehicleData(access.teamId);
  const { vehicle, log } = await data.vehicleLog(idParam(params.vehicleId), idParam(params.logId));
  return { kind: "log", vehicleId: vehicle.id, logId: log.id };
};

export const loader = sharePanelLoader(subjectOf);

export const action = sharePanelAction(subjectOf);
