import { approveSchema, rejectSchema, withdrawSchema } from "~/lib/domain/signoff";
import { NotFound } from "~/lib/domain/errors";
import { signoffData } from "~/lib/data/signoffs.server";
import { idParam } from "~/lib/http/params";
import { appOrigin, clientIp } from "~/lib/http/request.server";
import { readJsonBody } from "~/lib/http/json-body.server";
import type { Route } from "./+types/api.v1.signoff-step";
import { requireAccess } from "~/lib/http/access.server";
import { apiError, apiRoute } from "~/lib/http/edge.server";

const STEPS = ["approve", "reject", "withdraw"] as const;
type Step = (typeof STEPS)[number];

function stepOf(value: string | undefined): Step {
  const step = STEPS.find((s) => s === value);
  if (!step)
    throw new NotFound(
      "There is no such API endpoint: the steps are approve, reject and withdraw.",
    );
  return step;
}

/** A step is a POST; reading one is a 405 (an unknown step is a 404). */
export const loader = apiRoute(async ({ params }: Route.LoaderArgs) => {
  stepOf(params.step);
  return apiError(405, "method_not_allowed", "Use POST.");
});

/**
 * POST /api/v1/signoffs/:signoffId/approve and /reject, JSON { comment } (optional to approve,
 * required to reject), and /withdraw, JSON { reason } → 200 { signoff }. Engineers and admins:
 * never the proposer, and only an admin when the team says so (403); only a proposal is decided
 * (409). Withdrawing closes a proposed or approved sign-off with an audited step.
 */
export const action = apiRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const step = stepOf(params.step);
  if (request.method !== "POST") return apiError(405, "method_not_allowed", "Use POST.");
  const { teamId, userId, role } = await requireAccess(request, "engineer", { from: "api" });
  const id = idParam(params.signoffId);
  const caller = { userId, role, ip: clientIp(context), origin: appOrigin(request) };
  const data = signoffData(teamId);
  await data.get(id); // another team's or a missing sign-off: 404 before the body is read
  let signoff;
  if (step === "withdraw") {
    const { reason } = await readJsonBody(request, withdrawSchema, {
      code: "invalid_withdrawal",
      example: '{"reason": "The damper supplier changed the spring material."}',
    });
    signoff = await data.withdraw(id, reason, caller);
  } else {
    const { comment } = await readJsonBody(
      request,
      step === "approve" ? approveSchema : rejectSchema,
      {
        code: "invalid_decision",
        example: '{"comment": "Checked the run-up margins."}',
      },
    );
    signoff =
      step === "approve"
        ? await data.approve(id, comment, caller)
        : await data.reject(id, comment, caller);
  }
  return Response.json({ signoff }, { headers: { "Cache-Control": "no-store" } });
});
