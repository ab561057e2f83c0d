import { Link, useLoaderData } from "react-router";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { buttonLinkClass, linkClass } from "~/components/form-fields";
import { Card, EmptyState, PageHeader, tableClass, tdClass, thClass } from "~/components/page";
import { fuelLabels } from "~/components/vehicle-form";
import { damperLabels } from "~/lib/domain/drive-log-terms";
import { atLeast } from "~/lib/domain/roles";
import { vehicleFiringOrder } from "~/lib/domain/vehicle-firing-order";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/vehicles";
import { ScrollArea } from "~/components/scroll-area";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

export const meta = () => [{ title: "Vehicles · Twistlog" }];

export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const showArchived = new URL(request.url).searchParams.get("archived") === "1";
  const rows = await vehicleData(team.id).list({ archived: true });
  const archivedCount = rows.filter((v) => v.archivedAt).length;
  return {
    role: team.role,
    teamName: team.name,
    showArchived,
    archivedCount,
    vehicles: rows
      .filter((v) => showArchived || !v.archivedAt)
      .map((v) => ({
        id: v.id,
        name: v.name,
        identifier: v.identifier,
        cylinders: v.cylinders,
        stroke: v.stroke,
        fuel: v.fuel,
        firingOrder: vehicleFiringOrder(v),
        overridden: v.firingOrderOverride !== null,
        damper: `${damperLabels[v.damperType]}, ${v.damperVariant}`,
        archived: v.archivedAt !== null,
      })),
  };
});

export default function Vehicles() {
  const { role, teamName, vehicles, showArchived, archivedCount } = useLoaderData<typeof loader>();
  const engineer = atLeast(role, "engineer");
  return (
    <div>
      <div className="flex flex-wrap items-start justify-between gap-4">
        <PageHeader
          title="Vehicles"
          lead={`The instrumented vehicles of ${teamName}. Open one to see its drive logs or upload new ones.`}
        />
        {engineer ? (
          <Link
            to="/vehicles/new"
            className={`${buttonLinkClass} bg-indigo-600 text-white hover:bg-indigo-700`}
          >
            Add vehicle
          </Link>
        ) : null}
      </div>
      <Card title={showArchived ? "All vehicles" : "Vehicles in use"} id="vehicles">
        {vehicles.length === 0 ? (
          <EmptyState>
            {engineer ? (
              <>
                No vehicles yet.{" "}
                <Link to="/vehicles/new" className={linkClass}>
                  Add a vehicle
                </Link>{" "}
                with its engine and damper, then upload its drive logs.
              </>
            ) : (
              "No vehicles yet. An engineer of the team adds them; ask one to add the vehicle you test."
            )}
          </EmptyState>
        ) : (
          <ScrollArea label="Vehicles in use">
            <table className={tableClass}>
              <thead>
                <tr>
                  <th className={thClass}>Name</th>
                  <th className={thClass}>Identifier</th>
                  <th className={thClass}>Engine</th>
                  <th className={thClass}>Firing order</th>
                  <th className={thClass}>Damper fitted</th>
                </tr>
              </thead>
              <tbody>
                {vehicles.map((v) => (
                  <tr key={v.id}>
                    <td className={tdClass}>
                      <Link to={`/vehicles/${v.id}`} className={linkClass}>
                        {v.name}
                      </Link>
                      {v.archived ? (
                        <span className="ml-2 rounded bg-neutral-100 px-1.5 py-0.5 text-xs text-neutral-600">
                          archived
                        </span>
                      ) : null}
                    </td>
                    <td className={`${tdClass} font-mono text-xs whitespace-nowrap`}>
                      {v.identifier}
                    </td>
                    <td className={`${tdClass} whitespace-nowrap`}>
                      {v.cylinders} cyl., {v.stroke === 2 ? "two" : "four"}-stroke,{" "}
                      {fuelLabels[v.fuel].toLowerCase()}
                    </td>
                    <td className={tdClass}>
                      order {v.firingOrder}
                      {v.overridden ? <span className="text-neutral-500"> (set)</span> : null}
                    </td>
                    <td className={tdClass}>{v.damper}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </ScrollArea>
        )}
        {archivedCount > 0 || showArchived ? (
          <p className="mt-4 text-sm">
            <Link to={showArchived ? "/vehicles" : "/vehicles?archived=1"} className={linkClass}>
              {showArchived
                ? "Hide archived vehicles"
                : `Show archived vehicles (${archivedCount})`}
            </Link>
          </p>
        ) : null}
      </Card>
    </div>
  );
}

// Errors (403, 404, …) show inside the app's frame, with the header still there.
export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
