import { Link, useLoaderData } from "react-router";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { linkClass } from "~/components/form-fields";
import { Card, EmptyState, PageHeader } from "~/components/page";
import { suggestedPairs } from "~/lib/domain/comparison-order";
import { conditionLabels, LOG_CONDITIONS, type LogCondition } from "~/lib/domain/drive-log-terms";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/comparisons";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

export const meta = () => [{ title: "Comparisons · Twistlog" }];

interface Suggestion {
  condition: LogCondition;
  gear: number | null;
  /** The two drive logs, the reference first. */
  logs: { damperVariant: string; testDate: string | null }[];
  href: string;
}

/**
 * /comparisons: ready-made before/after pairs: for each vehicle, condition and gear, every pair
 * of damper variants with analysed drive logs, reference first (suggestedPairs in
 * app/lib/domain/comparison-order.ts: stable, a file uploaded again is no new candidate). Any other set
 * is picked on the vehicle page.
 */
export const loader = pageRoute(async ({ request }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const data = vehicleData(team.id);
  const vehicles = await data.list();
  const rows = await Promise.all(
    vehicles.map(async (v) => {
      const logs = (await data.logs(v.id)).map((l) => ({
        ...l,
        analysed: l.latestAnalysisId !== null,
      }));
      const suggestions: Suggestion[] = suggestedPairs(logs, v.damperVariant, LOG_CONDITIONS).map(
        (p) => ({
          condition: p.condition,
          gear: p.gear,
          logs: p.logs.map((l) => ({ damperVariant: l.damperVariant, testDate: l.testDate })),
          href: `/vehicles/${v.id}/compare?logs=${p.logs.map((l) => l.id).join(",")}`,
        }),
      );
      return { id: v.id, name: v.name, identifier: v.identifier, suggestions };
    }),
  );
  return { vehicles: rows };
});

export default function Comparisons() {
  const { vehicles } = useLoaderData<typeof loader>();
  const any = vehicles.some((v) => v.suggestions.length);
  return (
    <div>
      <PageHeader
        title="Comparisons"
        lead="Before-and-after views of drive logs of one vehicle. Below is every pair ready to compare (the same condition and gear with different damper variants, the latest tested drive log of each variant), the reference first; for any other set, tick the drive logs on a vehicle page and press “Compare selected”. A comparison's address can be bookmarked."
      />
      {!any ? (
        <EmptyState>
          No vehicle has analysed drive logs of two damper variants under the same condition yet.
          Upload a drive log of each variant on a{" "}
          <Link to="/vehicles" className={linkClass}>
            vehicle page
          </Link>
          .
        </EmptyState>
      ) : (
        <div className="space-y-4">
          {vehicles
            .filter((v) => v.suggestions.length)
            .map((v) => (
              <Card key={v.id} id={`vehicle-${v.id}`} title={`${v.name} (${v.identifier})`}>
                <ul className="space-y-2 text-sm">
                  {v.suggestions.map((s) => (
                    <li key={s.href} data-testid="suggested-pair">
                      <Link to={s.href} className={linkClass}>
                        {conditionLabels[s.condition]}
                        {s.gear && s.gear > 0 ? `, gear ${s.gear}` : ""}: damper{" "}
                        {s.logs[0]!.damperVariant} (reference) vs {s.logs[1]!.damperVariant}
                      </Link>
                      <span className="ml-2 text-neutral-500">
                        test dates {s.logs.map((l) => l.testDate ?? "none").join(" and ")}
                      </span>
                    </li>
                  ))}
                </ul>
              </Card>
            ))}
        </div>
      )}
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
