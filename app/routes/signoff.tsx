import { data, useActionData, useLoaderData } from "react-router";
import { Breadcrumb } from "~/components/breadcrumb";
import { VerdictCaution } from "~/components/caution-note";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { linkClass } from "~/components/form-fields";
import { Card, Notice, When } from "~/components/page";
import { SharePanel } from "~/components/share-panel";
import { DecisionForms, WithdrawForm, type StepRefusal } from "~/components/signoff-actions";
import { ClaimsSummary } from "~/components/signoff-claims";
import { EvidenceTable, SignoffHistory } from "~/components/signoff-evidence";
import { SignoffStateBadge } from "~/components/signoff-state";
import { signoffData } from "~/lib/data/signoffs.server";
import { teamData } from "~/lib/data/team-data.server";
import { Conflict, Invalid, NotFound } from "~/lib/domain/errors";
import { atLeast } from "~/lib/domain/roles";
import {
  approveSchema,
  claimTally,
  mayDecide,
  mayPropose,
  rejectSchema,
  withdrawSchema,
} from "~/lib/domain/signoff";
import { signoffStateHints } from "~/lib/domain/signoff-text";
import { requireAccess } from "~/lib/http/access.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { pageRoute } from "~/lib/http/edge.server";
import { readForm } from "~/lib/http/forms.server";
import { idParam } from "~/lib/http/params";
import { clientIp } from "~/lib/http/request.server";
import { signoffView } from "~/lib/http/signoff-pages.server";
import type { Route } from "./+types/signoff";

/**
 * /vehicles/:vehicleId/signoffs/:signoffId — one sign-off (issue 16): its state, claims and
 * deviations, the frozen evidence, the digest once approved, the history; approve or reject for
 * whoever may decide, withdraw for engineers and admins, the evidence report and a share link.
 */
export const meta = ({ data }: Route.MetaArgs) => [
  {
    title: data
      ? `Sign-off ${data.signoff.id} · ${data.signoff.vehicle.identifier} · Twistlog`
      : "Sign-off · Twistlog",
  },
];

async function load(
  request: Request,
  params: Route.LoaderArgs["params"],
  role: "viewer" | "engineer",
) {
  const access = await requireAccess(request, role);
  const signoffs = signoffData(access.team.id);
  const signoff = await signoffs.get(idParam(params.signoffId));
  if (signoff.vehicleId !== idParam(params.vehicleId))
    throw new NotFound("No such sign-off for this vehicle.");
  return { ...access, signoffs, signoff };
}

const NOTICES: Record<string, string> = {
  proposed: "The sign-off is proposed. Whoever may approve it has been sent an e-mail.",
};

export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team, user, signoffs, signoff } = await load(request, params, "viewer");
  const [{ record }, settings] = await Promise.all([
    signoffs.record(signoff.id),
    teamData(team.id).team(),
  ]);
  const notice = new URL(request.url).searchParams.get("notice");
  return {
    role: team.role,
    signoff: signoffView(signoff, record),
    vehicleId: signoff.vehicleId,
    decide:
      signoff.state === "proposed"
        ? mayDecide({
            approvers: settings.signoffApprovers,
            caller: { userId: user.id, role: team.role },
            proposedBy: signoff.proposedBy.id,
          })
        : null,
    notice: notice ? (NOTICES[notice] ?? null) : null,
  };
});

export const action = pageRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const intent = form.get("intent");
  // Every step on a sign-off is the engineer's or admin's: 403 for technicians and viewers.
  const { team, user, signoffs, signoff } = await load(request, params, "engineer");
  const caller = { userId: user.id, role: team.role, ip: clientIp(context) };
  const text = (name: string) => {
    const v = form.get(name);
    return typeof v === "string" ? v : "";
  };
  const refuse = (step: StepRefusal["step"], error: string, typed: string) =>
    data<{ refusal: StepRefusal }>({ refusal: { step, error, text: typed } }, { status: 400 });
  try {
    if (intent === "approve") {
      const parsed = approveSchema.safeParse({ comment: text("comment") });
      if (!parsed.success)
        return refuse("approve", parsed.error.issues[0]!.message, text("comment"));
      await signoffs.approve(signoff.id, parsed.data.comment, caller);
      return {
        notice: "The sign-off is approved: its evidence is frozen and its digest recorded.",
      };
    }
    if (intent === "reject") {
      const parsed = rejectSchema.safeParse({ comment: text("comment") });
      if (!parsed.success)
        return refuse("reject", parsed.error.issues[0]!.message, text("comment"));
      await signoffs.reject(signoff.id, parsed.data.comment, caller);
      return { notice: "The sign-off is rejected; the proposer has been sent your comment." };
    }
    if (intent === "withdraw") {
      const parsed = withdrawSchema.safeParse({ reason: text("reason") });
      if (!parsed.success)
        return refuse("withdraw", parsed.error.issues[0]!.message, text("reason"));
      await signoffs.withdraw(signoff.id, parsed.data.reason, caller);
      return { notice: "The sign-off is withdrawn. Its record and history stay." };
    }
  } catch (error) {
    // Someone else decided or the evidence changed meanwhile: say so on the page.
    if (error instanceof Conflict)
      return data(
        { conflict: `${error.message} The page now shows its current state.` },
        { status: 409 },
      );
    throw error;
  }
  throw new Invalid("Unknown action.");
});

export default function SignoffPage() {
  const { role, signoff: s, vehicleId, decide, notice } = useLoaderData<typeof loader>();
  const reply = useActionData<typeof action>();
  const refusal = reply && "refusal" in reply ? reply.refusal : null;
  const base = `/vehicles/${vehicleId}`;
  const logHref = (id: number) => `${base}/logs/${id}`;
  const tally = claimTally(s.claims);
  const open = s.state === "proposed" || s.state === "approved";
  return (
    <div className="space-y-6">
      <Breadcrumb
        trail={[
          { label: "Vehicles", to: "/vehicles" },
          { label: s.vehicle.identifier, to: base },
          { label: `Sign-off ${s.id}` },
        ]}
      />
      <header className="space-y-2">
        <p className="text-sm text-neutral-600">
          {s.vehicle.name} ({s.vehicle.identifier})
        </p>
        <h1 className="flex flex-wrap items-center gap-3 text-2xl font-semibold tracking-tight">
          Sign-off {s.id}: variant {s.damperVariant} <SignoffStateBadge state={s.state} />
        </h1>
        <p className="max-w-3xl text-neutral-600">{signoffStateHints[s.state]}</p>
      </header>
      {notice ? <Notice>{notice}</Notice> : null}
      {reply && "notice" in reply && reply.notice ? <Notice>{reply.notice}</Notice> : null}
      {reply && "conflict" in reply ? (
        <p
          role="alert"
          className="rounded-md border border-red-200 bg-red-50 px-4 py-2 text-sm text-red-800"
        >
          {reply.conflict}
        </p>
      ) : null}
      {s.closedReason && (s.state === "superseded" || s.state === "withdrawn") ? (
        <aside
          aria-label={s.state === "superseded" ? "Why it is superseded" : "Why it is withdrawn"}
          className="rounded-md border border-amber-500 bg-amber-50 px-4 py-3 text-sm text-amber-950"
          data-closed-reason
        >
          <p className="font-semibold">
            {s.state === "superseded" ? "Superseded" : "Withdrawn"}{" "}
            {s.closedAt ? (
              <>
                on <When date={s.closedAt} />
              </>
            ) : null}
          </p>
          <p className="mt-1">{s.closedReason}</p>
          <p className="mt-1 text-xs">
            The record below is unchanged: it shows the evidence as it was frozen.
          </p>
        </aside>
      ) : null}
      <div className="grid gap-6 lg:grid-cols-[2fr_1fr]">
        <div className="min-w-0 space-y-6">
          <Card title="Claims" id="claims">
            <p className="mb-2 text-sm text-neutral-700">
              {s.claims.length} {s.claims.length === 1 ? "target" : "targets"} claimed: {tally.pass}{" "}
              {tally.pass === 1 ? "passes" : "pass"}
              {tally.deviations ? `, ${tally.deviations} with a recorded deviation` : ""}.
            </p>
            {s.note ? (
              <blockquote className="mb-3 border-l-4 border-indigo-300 px-3 py-1 text-sm whitespace-pre-line text-neutral-800">
                {s.note}
              </blockquote>
            ) : null}
            <ClaimsSummary claims={s.claims} logHref={logHref} />
            <div className="mt-4">
              <VerdictCaution />
            </div>
          </Card>
          <Card title="Frozen evidence" id="evidence">
            <EvidenceTable signoff={s} logHref={logHref} />
          </Card>
        </div>
        <div className="min-w-0 space-y-6">
          {s.state === "proposed" ? (
            <Card title="Approve or reject" id="decision">
              <DecisionForms refusal={refusal} reasonNot={decide} />
            </Card>
          ) : null}
          <Card title="Evidence report" id="report">
            <p className="text-sm text-neutral-600">
              {s.state === "proposed" || s.digest === null
                ? "A4 PDF of the claims, curves and traceability, marked draft until the sign-off is approved."
                : "The approved report as it was stored, byte for byte."}
            </p>
            <a
              href={`/api/v1/signoffs/${s.id}/report.pdf`}
              className={`${linkClass} mt-2 inline-block text-sm`}
              download
            >
              Evidence report (PDF)
            </a>
          </Card>
          <Card title="Proposal and decision" id="people">
            <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
              <dt className="text-neutral-500">Proposed by</dt>
              <dd>
                {s.proposedBy.name}, <When date={s.proposedAt} />
              </dd>
              {s.decidedBy ? (
                <>
                  <dt className="text-neutral-500">Decided by</dt>
                  <dd>
                    {s.decidedBy.name}, <When date={s.decidedAt} />
                  </dd>
                  <dt className="text-neutral-500">Comment</dt>
                  <dd className="whitespace-pre-line">{s.decisionComment || "—"}</dd>
                </>
              ) : null}
            </dl>
          </Card>
          <Card title="History" id="history">
            <SignoffHistory history={s.history} />
          </Card>
          {open && mayPropose(role) ? (
            <Card title="Withdraw" id="withdraw">
              <WithdrawForm refusal={refusal} />
            </Card>
          ) : null}
        </div>
      </div>
      {atLeast(role, "engineer") ? (
        <SharePanel endpoint={`${base}/signoffs/${s.id}/share`} signoff />
      ) : null}
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
