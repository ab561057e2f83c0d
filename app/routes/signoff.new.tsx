import { data, Form, redirect, useActionData, useLoaderData } from "react-router";
import { Breadcrumb } from "~/components/breadcrumb";
import { VerdictCaution } from "~/components/caution-note";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { buttonClass } from "~/components/form";
import { inputClass, linkClass } from "~/components/form-fields";
import { EmptyState, PageHeader } from "~/components/page";
import { ProposalForm } from "~/components/signoff-proposal";
import { signoffData } from "~/lib/data/signoffs.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { Invalid } from "~/lib/domain/errors";
import type { ClaimCheck } from "~/lib/domain/signoff";
import { requireAccess } from "~/lib/http/access.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { pageRoute } from "~/lib/http/edge.server";
import { readForm } from "~/lib/http/forms.server";
import { idParam } from "~/lib/http/params";
import { clientIp } from "~/lib/http/request.server";
import {
  blockingErrors,
  defaultProposal,
  proposalData,
  readProposal,
  type ProposalValues,
} from "~/lib/http/signoff-pages.server";
import type { Route } from "./+types/signoff.new";

/**
 * /vehicles/:vehicleId/signoffs/new?damperVariant=X — an engineer proposes a sign-off of one
 * damper variant (issue 16): the targets claimed, the drive logs that prove each, deviations
 * with reasons, a note. Engineers and admins only (technicians and viewers: 403).
 */
export const meta = ({ data }: Route.MetaArgs) => [
  { title: `Propose sign-off · ${data?.vehicle.identifier ?? "Vehicle"} · Twistlog` },
];

export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "engineer");
  const wanted = new URL(request.url).searchParams.get("damperVariant");
  const page = await proposalData(team.id, idParam(params.vehicleId), wanted);
  return {
    ...page,
    initial: defaultProposal(
      page.damperVariant,
      page.targets.map((t) => t.id),
      page.logs,
    ),
  };
});

interface Refusal {
  values: ProposalValues;
  errors: Record<string, string>;
  checks: ClaimCheck[] | null;
  notice?: string;
}

export const action = pageRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const { team, user } = await requireAccess(request, "engineer");
  // Another team's vehicle is a 404 before anything is read of the form.
  const vehicleId = (await vehicleData(team.id).vehicle(idParam(params.vehicleId))).id;
  const intent = form.get("intent");
  if (intent !== "propose" && intent !== "check") throw new Invalid("Unknown action.");
  const signoffs = signoffData(team.id);
  const { values, input, errors } = readProposal(form);
  if (!input) return data<Refusal>({ values, errors, checks: null }, { status: 400 });
  const check = await signoffs.check(vehicleId, input);
  const refusal: Refusal = {
    values,
    checks: check.checks,
    errors: {
      ...blockingErrors(check.checks),
      ...(check.problems.length ? { form: check.problems.join(" ") } : {}),
    },
  };
  if (intent === "check")
    return {
      ...refusal,
      notice: check.blocked
        ? "Checked: the proposal cannot go ahead yet; see the claims marked below."
        : "Checked: every claim holds or has a deviation; the proposal can go ahead.",
    };
  if (check.blocked) return data(refusal, { status: 400 });
  try {
    const made = await signoffs.propose(vehicleId, input, {
      userId: user.id,
      role: team.role,
      ip: clientIp(context),
    });
    return redirect(`/vehicles/${vehicleId}/signoffs/${made.id}?notice=proposed`);
  } catch (error) {
    // A change between the check and the proposal (a log re-analysed meanwhile): say so, keep
    // everything typed.
    if (!(error instanceof Invalid)) throw error;
    return data<Refusal>({ ...refusal, errors: { form: error.message } }, { status: 400 });
  }
});

export default function ProposeSignoff() {
  const page = useLoaderData<typeof loader>();
  const reply = useActionData<typeof action>();
  const refusal = reply && "values" in reply ? reply : null;
  const sameVariant = refusal?.values.damperVariant === page.damperVariant;
  const vehicleHref = `/vehicles/${page.vehicle.id}`;
  return (
    <div className="space-y-6">
      <Breadcrumb
        trail={[
          { label: "Vehicles", to: "/vehicles" },
          { label: page.vehicle.identifier, to: vehicleHref },
          { label: "Propose sign-off" },
        ]}
      />
      <PageHeader
        title={`Propose a sign-off: variant ${page.damperVariant || "—"}`}
        lead={
          <>
            Claim the targets this damper variant of {page.vehicle.name} ({page.vehicle.identifier})
            meets, and name the drive logs that prove each. A second person approves or rejects it;
            the evidence is frozen when it is proposed.
          </>
        }
      />
      {page.variants.length > 1 ? (
        <Form method="get" className="flex flex-wrap items-end gap-3">
          <div>
            <label htmlFor="variant" className="block text-sm font-medium text-neutral-800">
              Damper variant
            </label>
            <select
              id="variant"
              name="damperVariant"
              defaultValue={page.damperVariant}
              className={`mt-1 ${inputClass}`}
            >
              {page.variants.map((v) => (
                <option key={v} value={v}>
                  {v}
                </option>
              ))}
            </select>
          </div>
          <button type="submit" className={buttonClass("secondary")}>
            Show this variant
          </button>
        </Form>
      ) : null}
      {reply && "notice" in reply && reply.notice ? (
        <p
          role="status"
          className="rounded-md border border-indigo-200 bg-indigo-50 px-4 py-2 text-sm text-indigo-950"
        >
          {reply.notice}
        </p>
      ) : null}
      {page.targets.length === 0 ? (
        <EmptyState>
          This vehicle has no targets yet. Add the programme&apos;s targets on the{" "}
          <a href={`${vehicleHref}#targets`} className={linkClass}>
            vehicle page
          </a>{" "}
          first; a sign-off claims targets.
        </EmptyState>
      ) : page.logs.length === 0 ? (
        <EmptyState>
          No finished drive log of variant {page.damperVariant || "—"} yet. A sign-off rests on
          analysed drive logs: upload them on the{" "}
          <a href={vehicleHref} className={linkClass}>
            vehicle page
          </a>
          .
        </EmptyState>
      ) : (
        <>
          <VerdictCaution />
          <ProposalForm
            key={page.damperVariant}
            vehicleId={page.vehicle.id}
            damperVariant={page.damperVariant}
            targets={page.targets}
            logs={page.logs}
            initial={refusal && sameVariant ? refusal.values : page.initial}
            errors={refusal && sameVariant ? refusal.errors : {}}
            serverChecks={refusal?.checks ?? null}
          />
        </>
      )}
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
