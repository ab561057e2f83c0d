import { idParam } from "~/lib/http/params";
import {
  sharePanelAction,
  sharePanelLoader,
  type SubjectResolver,
} from "~/lib/http/share-panel.server";
import { signoffData } from "~/lib/data/signoffs.server";
import { NotFound } from "~/lib/domain/errors";

/**
 * /vehicles/:vehicleId/signoffs/:signoffId/share — the share panel's resource route for a
 * sign-off (engineer and up; issue 16). GET: its share links as JSON { shares }. POST (form, CSRF
 * token): intent create, extend, revoke or email (app/lib/http/share-panel.server.ts). The link
 * opens the sign-off's evidence page and report only.
 */
const subjectOf: SubjectResolver = async ({ params }, access) => {
  const signoff = await signoffData(access.teamId).get(idParam(params.signoffId));
  if (signoff.vehicleId !== idParam(params.vehicleId))
    throw new NotFound("No such sign-off for this vehicle.");
  return { kind: "signoff", vehicleId: signoff.vehicleId, signoffId: signoff.id };
};

export const loader = sharePanelLoader(subjectOf);

export const action = sharePanelAction(subjectOf);
