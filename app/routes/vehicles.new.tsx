import { parseWithZod } from "@conform-to/zod/v4";
import { data, redirect, useActionData } from "react-router";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { PageHeader } from "~/components/page";
import { VehicleForm, vehicleDefaults, vehicleFormSchema } from "~/components/vehicle-form";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { audit } from "~/lib/data/audit.server";
import { clientIp } from "~/lib/http/request.server";
import type { Route } from "./+types/vehicles.new";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

export const meta = () => [{ title: "Add a vehicle · Twistlog" }];

export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  await requireAccess(request, "engineer");
  return null;
});

export const action = pageRoute(async ({ request, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const { team, user } = await requireAccess(request, "engineer");
  const submission = parseWithZod(form, { schema: vehicleFormSchema });
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const vehicles = vehicleData(team.id);
  if (await vehicles.identifierTaken(submission.value.identifier)) {
    return data(
      submission.reply({
        fieldErrors: {
          identifier: [`Another vehicle of the team is ${submission.value.identifier} already.`],
        },
      }),
      { status: 400 },
    );
  }
  const id = await vehicles.create(submission.value);
  await audit({
    teamId: team.id,
    actor: { id: user.id, email: user.email },
    action: "vehicle-created",
    detail: `vehicle ${id} (${submission.value.identifier})`,
    ip: clientIp(context),
  });
  return redirect(`/vehicles/${id}`);
});

export default function NewVehicle() {
  const lastResult = useActionData<typeof action>();
  return (
    <div className="max-w-4xl">
      <PageHeader
        title="Add a vehicle"
        lead="The engine, transmission and damper decide how its drive logs are analysed; you can change them later."
      />
      <VehicleForm
        lastResult={lastResult}
        defaults={vehicleDefaults()}
        submitLabel="Add vehicle"
        cancelTo="/vehicles"
      />
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
