import { parseWithZod } from "@conform-to/zod/v4";
import { queueBatch } from "~/lib/data/reanalysis-batch.server";
import { reanalyseAllSchema } from "~/components/reanalyse-all-schema";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { idParam } from "~/lib/http/params";
import { clientIp } from "~/lib/http/request.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/vehicle.reanalyse";
import { requireAccess } from "~/lib/http/access.server";
import { Invalid } from "~/lib/domain/errors";
import { apiError, panelRoute } from "~/lib/http/edge.server";

/**
 * /vehicles/:vehicleId/reanalyse — the vehicle page's "re-analyse all" panel
 * (app/components/reanalyse-all.tsx) posts here with a fetcher: a form with the CSRF token,
 * intent "reanalyse-all", the settings and an optional damper variant (engineer and up). It
 * answers { intent, result, batch: { batchId, jobs } }, or 400 with the fields' messages; the
 * panel then polls GET /api/v1/vehicles/:vehicleId/reanalyse/:batchId. Refusals come back as
 * JSON { error: { code, message } } (panelRoute).
 */
export const action = panelRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const { team, user } = await requireAccess(request, "engineer");
  const vehicleId = idParam(params.vehicleId);
  await vehicleData(team.id).vehicle(vehicleId); // another team's vehicle: 404 before the form
  if (form.get("intent") !== "reanalyse-all") throw new Invalid("Unknown action.");
  const submission = parseWithZod(form, { schema: reanalyseAllSchema });
  const noStore = { "Cache-Control": "no-store" };
  if (submission.status !== "success")
    return Response.json(
      { intent: "reanalyse-all", result: submission.reply() },
      { status: 400, headers: noStore },
    );
  const { intent: _, damperVariant, ...overrides } = submission.value;
  const batch = await queueBatch({
    teamId: team.id,
    vehicleId,
    overrides,
    damperVariant,
    actor: { id: user.id, email: user.email },
    ip: clientIp(context),
  });
  return Response.json(
    { intent: "reanalyse-all", result: submission.reply({ resetForm: true }), batch },
    { status: 202, headers: noStore },
  );
});

/** Reading is the API's: GET /api/v1/vehicles/:vehicleId/reanalyse/:batchId. */
export const loader = panelRoute(async () =>
  apiError(
    405,
    "method_not_allowed",
    "Post the form; its progress is at /api/v1/…/reanalyse/:batchId.",
  ),
);
