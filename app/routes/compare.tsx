import { redirect, useLoaderData } from "react-router";
import { CommentsPanel } from "~/components/comments-panel";
import { ComparisonView } from "~/components/comparison-view";
import { SharePanel } from "~/components/share-panel";
import { Breadcrumb } from "~/components/breadcrumb";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { compareIsolation } from "~/lib/domain/comparison";
import { comparisonLogs } from "~/lib/data/comparison.server";
import { curvesForLogs, parseLogIds } from "~/lib/data/curves.server";
import { idParam } from "~/lib/http/params";
import { atLeast } from "~/lib/domain/roles";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/compare";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid } from "~/lib/domain/errors";

export const meta = ({ data }: Route.MetaArgs) => [
  { title: `Comparison${data ? ` · ${data.vehicle.identifier}` : ""} · Twistlog` },
];

/**
 * /vehicles/:vehicleId/compare?logs=ID,ID[,ID…]: two to eight drive logs of one vehicle. The
 * reference follows one rule (app/lib/domain/comparison-order.ts), not the order of `logs`, so every way
 * into a comparison reads the same. The URL is the comparison: it can be bookmarked and shared.
 */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const data = vehicleData(team.id);
  const vehicle = await data.vehicle(idParam(params.vehicleId));
  const search = new URL(request.url).searchParams;
  // The drive-log page's "Compare with…" form sends ?logs=ID&with=ID: fold it into one list.
  const folded = parseLogIds([search.get("logs"), search.get("with")].filter(Boolean).join(","));
  if (search.has("with") && folded)
    throw redirect(`/vehicles/${vehicle.id}/compare?logs=${folded.join(",")}`);
  const ids = parseLogIds(search.get("logs"));
  if (!(ids && ids.length >= 2))
    throw new Invalid(
      "A comparison needs two to eight drive logs: choose them on the vehicle page and press “Compare selected”.",
    );
  const { logs, referenceNote } = await comparisonLogs(data, vehicle, ids);
  const curves = await curvesForLogs(team.id, vehicle.id, ids);
  const comparison = compareIsolation(
    logs
      .filter((l) => l.analysed)
      .map((l) => {
        const c = curves.find((x) => x.logId === l.id)!;
        return { logId: l.id, name: l.name, rpm: c.isolation.rpm, dB: c.isolation.dB };
      }),
  );
  return {
    role: team.role,
    vehicle: { id: vehicle.id, name: vehicle.name, identifier: vehicle.identifier },
    logs,
    referenceNote,
    comparison,
  };
});

export default function ComparePage() {
  const { role, vehicle, logs, referenceNote, comparison } = useLoaderData<typeof loader>();
  const ids = logs.map((l) => l.id);
  return (
    <div className="space-y-6">
      <Breadcrumb
        trail={[
          { label: "Vehicles", to: "/vehicles" },
          { label: vehicle.identifier, to: `/vehicles/${vehicle.id}` },
          { label: "Comparison" },
        ]}
      />
      <ComparisonView
        vehicle={vehicle}
        logs={logs}
        referenceNote={referenceNote}
        comparison={comparison}
        curvesUrl={`/vehicles/${vehicle.id}/curves.json?logs=${ids.join(",")}`}
        logHref={(id) => `/vehicles/${vehicle.id}/logs/${id}`}
      />
      {atLeast(role, "engineer") ? (
        <SharePanel endpoint={`/vehicles/${vehicle.id}/compare/share`} logs={ids} />
      ) : null}
      {/* Comments follow the set of drive logs, whatever order the URL lists them in. */}
      <CommentsPanel
        vehicleId={vehicle.id}
        subject={`compare:${[...ids].sort((a, b) => a - b).join(",")}`}
      />
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
