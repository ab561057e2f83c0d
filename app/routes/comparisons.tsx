import { Link, useLoaderData } from "react-router";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { linkClass } from "~/components/form-fields";
import { Card, EmptyState, PageHeader } from "~/components/page";
import { conditionLabels, type LogCondition } from "~/lib/drive-log-terms";
import { requireTeamRole } from "~/lib/permissions.server";
import { vehicleData } from "~/lib/vehicles.server";
import type { Route } from "./+types/comparisons";

export const meta = () => [{ title: "Comparisons · Twistlog" }];

interface Suggestion {
  condition: LogCondition;
  gear: number | null;
  variants: string[];
  href: string;
}

/**
 * /comparisons: ready-made before/after comparisons, one per vehicle, condition and gear where
 * analysed drive logs of two or more damper variants exist (the newest drive log of each
 * variant). Any other set is picked on the vehicle page.
 */
export async function loader({ request }: Route.LoaderArgs) {
  const { team } = await requireTeamRole(request, "viewer");
  const data = vehicleData(team.id);
  const vehicles = await data.list();
  const rows = await Promise.all(
    vehicles.map(async (v) => {
      const logs = (await data.logs(v.id)).filter((l) => l.latestAnalysisId);
      const groups = new Map<string, typeof logs>();
      for (const l of logs) {
        const key = `${l.condition}|${l.gear ?? ""}`;
        groups.set(key, [...(groups.get(key) ?? []), l]);
      }
      const suggestions: Suggestion[] = [];
      for (const group of groups.values()) {
        // logs() is newest first: the first drive log seen of each variant is its newest.
        const newest = new Map<string, (typeof logs)[number]>();
        for (const l of group) if (!newest.has(l.damperVariant)) newest.set(l.damperVariant, l);
        if (newest.size < 2) continue;
        const picked = [...newest.values()]
          .sort((a, b) => a.damperVariant.localeCompare(b.damperVariant))
          .slice(0, 8);
        suggestions.push({
          condition: group[0]!.condition,
          gear: group[0]!.gear,
          variants: picked.map((l) => l.damperVariant),
          href: `/vehicles/${v.id}/compare?logs=${picked.map((l) => l.id).join(",")}`,
        });
      }
      return { id: v.id, name: v.name, identifier: v.identifier, suggestions };
    }),
  );
  return { vehicles: rows };
}

export default function Comparisons() {
  const { vehicles } = useLoaderData<typeof loader>();
  const any = vehicles.some((v) => v.suggestions.length);
  return (
    <div>
      <PageHeader
        title="Comparisons"
        lead="Before-and-after views of drive logs of one vehicle. Below are the pairs ready to compare (the same condition and gear with different damper variants); for any other set, tick the drive logs on a vehicle page and press “Compare selected”. A comparison's address can be bookmarked."
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
              <Card key={v.id} title={`${v.name} (${v.identifier})`}>
                <ul className="space-y-2 text-sm">
                  {v.suggestions.map((s) => (
                    <li key={s.href}>
                      <Link to={s.href} className={linkClass}>
                        {conditionLabels[s.condition]}
                        {s.gear && s.gear > 0 ? `, gear ${s.gear}` : ""}: damper{" "}
                        {s.variants.join(" vs ")}
                      </Link>
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
