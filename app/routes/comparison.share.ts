import { parseLogIds } from "~/lib/data/curves.server";
import { idParam } from "~/lib/http/params";
import {
  sharePanelAction,
  sharePanelLoader,
  type SubjectResolver,
} from "~/lib/http/share-panel.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { Invalid, NotFound } from "~/lib/domain/errors";

/**
 * /vehicles/:vehicleId/compare/share?logs=ID,ID… — the share panel's resource route for a
 * comparison (engineer and up): GET lists the links of exactly this comparison, POST (form
 * with `logs`, CSRF token) creates, extends, revokes or e-mails, as for a drive log.
 */
const subjectOf: SubjectResolver = async ({ request, params }, access, form) => {
  const data = vehicleData(access.teamId);
  const vehicle = await data.vehicle(idParam(params.vehicleId));
  const raw = form?.get("logs") ?? new URL(request.url).searchParams.get("logs");
  const ids = parseLogIds(typeof raw === "string" ? raw : null);
  if (!ids || ids.length < 2)
    throw new Invalid("A comparison has 2 to 8 drive-log ids, separated by commas.");
  for (const id of ids) {
    const log = await data.log(id);
    if (log.vehicleId !== vehicle.id)
      throw new NotFound(`Drive log ${id} is not one of this vehicle's.`);
  }
  return { kind: "comparison", vehicleId: vehicle.id, logIds: ids };
};

export const loader = sharePanelLoader(subjectOf);

export const action = sharePanelAction(subjectOf);
