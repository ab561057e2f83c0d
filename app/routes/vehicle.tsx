import { useMemo } from "react";
import {
  data,
  Form,
  Link,
  redirect,
  useActionData,
  useLoaderData,
  useRevalidator,
} from "react-router";
import { RoadTestCaution } from "~/components/caution-note";
import { CsrfInput } from "~/components/csrf-input";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { SubmitButton } from "~/components/form";
import { buttonLinkClass, linkClass } from "~/components/form-fields";
import { LogStatus, type LogProgress } from "~/components/log-status";
import { Card, EmptyState, Notice, tableClass, tdClass, thClass, When } from "~/components/page";
import { UploadPanel } from "~/components/upload-panel";
import { useLogProgress } from "~/components/use-log-progress";
import { VehicleCard } from "~/components/vehicle-card";
import { assertCsrf } from "~/lib/csrf.server";
import { conditionLabels } from "~/lib/drive-log-terms";
import { idParam } from "~/lib/params";
import { invariantResponse, requireTeamRole } from "~/lib/permissions.server";
import { atLeast } from "~/lib/roles";
import { firingOrder } from "~/lib/signal/firing-order";
import { vehicleData } from "~/lib/vehicles.server";
import type { Route } from "./+types/vehicle";
import { uploadFromForm } from "./vehicle.upload.server";

export const meta = ({ data }: Route.MetaArgs) => [
  { title: `${data?.vehicle.identifier ?? "Vehicle"} · Twistlog` },
];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "viewer");
  const vehicles = vehicleData(team.id);
  const vehicle = await vehicles.vehicle(idParam(params.vehicleId));
  const logs = await vehicles.logs(vehicle.id);
  const search = new URL(request.url).searchParams;
  return {
    role: team.role,
    vehicle: {
      ...vehicle,
      archived: vehicle.archivedAt !== null,
      firingOrder:
        vehicle.firingOrderOverride ??
        firingOrder(vehicle.cylinders, vehicle.stroke === 2 ? 2 : 4) ??
        vehicle.cylinders / 2,
    },
    logs: logs.map((l) => ({
      id: l.id,
      fileName: l.fileName,
      condition: l.condition,
      gear: l.gear,
      damperVariant: l.damperVariant,
      testDate: l.testDate,
      uploadedAt: l.uploadedAt,
      status: l.status,
      progress: l.status === "done" ? 1 : l.progress,
      stage: l.stage,
      problem: l.status === "failed" && l.error ? l.error.message : null,
    })),
    // After a form upload without JavaScript: ?uploaded=12,13&dup=13-7 (log 13 repeats log 7).
    uploaded: (search.get("uploaded") ?? "")
      .split(",")
      .filter((s) => /^\d+$/.test(s))
      .map(Number),
    duplicates: (search.get("dup") ?? "")
      .split(",")
      .map((pair) => pair.split("-").map(Number))
      .filter(
        (p): p is [number, number] =>
          p.length === 2 && p.every((n) => Number.isSafeInteger(n) && n > 0),
      ),
    notice: search.get("notice") === "saved" ? "The vehicle is saved." : null,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const type = request.headers.get("content-type") ?? "";
  if (type.toLowerCase().startsWith("multipart/form-data"))
    return uploadFromForm(request, params.vehicleId);
  const form = await request.formData();
  await assertCsrf(request, form);
  const intent = form.get("intent");
  const { team } = await requireTeamRole(request, "engineer");
  const vehicles = vehicleData(team.id);
  const vehicle = await vehicles.vehicle(idParam(params.vehicleId));
  invariantResponse(intent === "archive" || intent === "restore", "Unknown action.", {
    status: 400,
  });
  await vehicles.setArchived(vehicle.id, intent === "archive");
  return {
    notice:
      intent === "archive"
        ? "The vehicle is archived: it is hidden from the list and takes no new drive logs. Its results stay."
        : "The vehicle is restored.",
  };
}

export default function VehiclePage() {
  const { role, vehicle, logs, uploaded, duplicates, notice } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const revalidator = useRevalidator();
  const progress: LogProgress[] = useMemo(
    () => logs.map(({ id, status, progress, stage }) => ({ id, status, progress, stage })),
    [logs],
  );
  const names = useMemo(() => new Map(logs.map((l) => [l.id, l.fileName])), [logs]);
  const { statuses, announcement } = useLogProgress(vehicle.id, progress, names);
  const engineer = atLeast(role, "engineer");
  const actionNotice = result && "notice" in result ? result.notice : null;
  const uploadError = result && "uploadError" in result ? result.uploadError : null;

  return (
    <main className="space-y-6">
      <nav aria-label="Breadcrumb" className="text-sm text-neutral-500">
        <Link to="/vehicles" className={linkClass}>
          Vehicles
        </Link>{" "}
        › {vehicle.identifier}
      </nav>
      <div className="flex flex-wrap items-start justify-between gap-4">
        <div>
          <h1 className="text-2xl font-semibold tracking-tight">
            {vehicle.name}
            {vehicle.archived ? (
              <span className="ml-3 rounded bg-neutral-100 px-2 py-0.5 align-middle text-sm font-medium text-neutral-600">
                archived
              </span>
            ) : null}
          </h1>
          <p className="mt-1 font-mono text-sm text-neutral-600">{vehicle.identifier}</p>
        </div>
        {engineer ? (
          <div className="flex gap-2">
            <Link
              to={`/vehicles/${vehicle.id}/edit`}
              className={`${buttonLinkClass} border border-neutral-300 bg-white text-neutral-800 hover:bg-neutral-50`}
            >
              Edit vehicle
            </Link>
            <Form method="post">
              <CsrfInput />
              <SubmitButton
                name="intent"
                value={vehicle.archived ? "restore" : "archive"}
                tone="secondary"
              >
                {vehicle.archived ? "Restore" : "Archive"}
              </SubmitButton>
            </Form>
          </div>
        ) : null}
      </div>
      {notice ? <Notice>{notice}</Notice> : null}
      {actionNotice ? <Notice>{actionNotice}</Notice> : null}
      {uploaded.length ? (
        <Notice>
          {uploaded.length === 1
            ? "1 drive log uploaded"
            : `${uploaded.length} drive logs uploaded`}
          ; its analysis runs in the background.
        </Notice>
      ) : null}
      {duplicates.map(([id, earlier]) => (
        <p
          key={id}
          className="rounded-md border border-amber-500 bg-amber-50 px-4 py-2 text-sm text-amber-950"
        >
          Drive log {id}: the same file was uploaded before as drive log {earlier} —{" "}
          <Link to={`/vehicles/${vehicle.id}/logs/${earlier}`} className={linkClass}>
            open it
          </Link>
          .
        </p>
      ))}
      <VehicleCard vehicle={vehicle} />
      <p role="status" aria-live="polite" className="sr-only">
        {announcement}
      </p>
      {logs.some((l) => l.status === "queued" || l.status === "analysing") ? (
        <noscript>
          <p className="text-sm text-neutral-700">
            Analyses are running.{" "}
            <a href={`/vehicles/${vehicle.id}`} className={linkClass}>
              Reload the page
            </a>{" "}
            to see how far they are.
          </p>
        </noscript>
      ) : null}
      <Card title="Drive logs" id="drive-logs">
        {logs.length === 0 ? (
          <EmptyState>
            No drive logs yet.{" "}
            {atLeast(role, "technician")
              ? "Upload the first one below, with its test condition."
              : "A technician or engineer uploads them after a test run."}
          </EmptyState>
        ) : (
          <div className="overflow-x-auto">
            <table className={tableClass}>
              <thead>
                <tr>
                  <th className={thClass}>File</th>
                  <th className={thClass}>Condition</th>
                  <th className={thClass}>Gear</th>
                  <th className={thClass}>Damper variant</th>
                  <th className={thClass}>Test date</th>
                  <th className={thClass}>Uploaded</th>
                  <th className={thClass}>Status</th>
                </tr>
              </thead>
              <tbody>
                {logs.map((l) => (
                  <tr key={l.id}>
                    <td className={`${tdClass} max-w-64 truncate`}>
                      <Link to={`/vehicles/${vehicle.id}/logs/${l.id}`} className={linkClass}>
                        {l.fileName}
                      </Link>
                    </td>
                    <td className={tdClass}>{conditionLabels[l.condition]}</td>
                    <td className={tdClass}>
                      {l.gear === null
                        ? "—"
                        : l.gear === 0
                          ? "neutral"
                          : l.gear === -1
                            ? "reverse"
                            : l.gear}
                    </td>
                    <td className={tdClass}>{l.damperVariant}</td>
                    <td className={`${tdClass} whitespace-nowrap`}>
                      {l.testDate ? <When date={l.testDate} dateOnly /> : "—"}
                    </td>
                    <td className={`${tdClass} whitespace-nowrap`}>
                      <When date={l.uploadedAt} />
                    </td>
                    <td className={tdClass}>
                      <LogStatus log={statuses.get(l.id) ?? l} label={l.fileName} />
                      {l.problem && statuses.get(l.id)?.status !== "queued" ? (
                        <span
                          className="mt-0.5 block max-w-64 truncate text-xs text-red-700"
                          title={l.problem}
                        >
                          {l.problem}
                        </span>
                      ) : null}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Card>
      {atLeast(role, "technician") && !vehicle.archived ? (
        <Card title="Upload drive logs" id="upload">
          <div className="grid gap-6 lg:grid-cols-[2fr_1fr]">
            <div className="self-start lg:order-last">
              <RoadTestCaution />
            </div>
            <div className="space-y-4">
              {uploadError ? (
                <p
                  role="alert"
                  className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800"
                >
                  {uploadError}
                </p>
              ) : null}
              <UploadPanel
                vehicleId={vehicle.id}
                damperVariant={vehicle.damperVariant}
                statuses={statuses}
                onUploaded={() => void revalidator.revalidate()}
              />
            </div>
          </div>
        </Card>
      ) : null}
    </main>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
