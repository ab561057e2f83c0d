import { parseWithZod } from "@conform-to/zod/v4";
import { data, redirect, useActionData, useLoaderData } from "react-router";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { PageHeader } from "~/components/page";
import { VehicleForm, vehicleDefaults, vehicleFormSchema } from "~/components/vehicle-form";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { idParam } from "~/lib/http/params";
import { vehicleData } from "~/lib/data/vehicles.server";
import { audit } from "~/lib/data/audit.server";
import { clientIp } from "~/lib/http/request.server";
import type { Route } from "./+types/vehicle.edit";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

export const meta = ({ data }: Route.MetaArgs) => [
  { title: `Edit ${data?.vehicle.identifier ?? "vehicle"} · Twistlog` },
];

export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "engineer");
  const vehicle = await vehicleData(team.id).vehicle(idParam(params.vehicleId));
  return { vehicle };
});

export const action = pageRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const { team, user } = await requireAccess(request, "engineer");
  const vehicles = vehicleData(team.id);
  const vehicle = await vehicles.vehicle(idParam(params.vehicleId));
  const submission = parseWithZod(form, { schema: vehicleFormSchema });
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  if (await vehicles.identifierTaken(submission.value.identifier, vehicle.id)) {
    return data(
      submission.reply({
        fieldErrors: {
          identifier: [`Another vehicle of the team is ${submission.value.identifier} already.`],
        },
      }),
      { status: 400 },
    );
  }
  const ip = clientIp(context);
  await vehicles.update(vehicle.id, submission.value, {
    id: user.id,
    email: user.email,
    name: user.name,
    ip,
  });
  await audit({
    teamId: team.id,
    actor: { id: user.id, email: user.email },
    action: "vehicle-changed",
    detail: `vehicle ${vehicle.id} (${submission.value.identifier})`,
    ip,
  });
  return redirect(`/vehicles/${vehicle.id}?notice=saved`);
});

export default function EditVehicle() {
  const { vehicle } = useLoaderData<typeof loader>();
  const lastResult = useActionData<typeof action>();
  return (
    <div className="max-w-4xl">
      <PageHeader
        title={`Edit ${vehicle.name}`}
        lead="Changes apply to the next analyses; finished analyses keep the settings they were made with."
      />
      <VehicleForm
        lastResult={lastResult}
        defaults={vehicleDefaults(vehicle)}
        submitLabel="Save vehicle"
        cancelTo={`/vehicles/${vehicle.id}`}
      />
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
