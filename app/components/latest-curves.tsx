import { useQueryClient } from "@tanstack/react-query";
import { useEffect, useRef } from "react";
import { CurveOverlay } from "./charts";
import { EmptyState } from "./page";

/** The vehicle page's "Latest isolation curves": the overlay of its latest analysed drive logs. */
export function LatestCurves({
  vehicle,
  analysedLogs,
}: {
  vehicle: { id: number; name: string; identifier: string };
  analysedLogs: number;
}) {
  return (
    <section aria-labelledby="latest-curves-title" className="min-w-0 space-y-3">
      <div>
        <h2 id="latest-curves-title" className="text-base font-semibold">
          Latest isolation curves
        </h2>
        <p className="text-sm text-neutral-600">
          The firing-order isolation of the vehicle&apos;s latest analysed drive logs (up to 8),
          newest first.
        </p>
      </div>
      {analysedLogs === 0 ? (
        <EmptyState>
          No analysed drive logs yet: their isolation curves appear here once an analysis has
          finished.
        </EmptyState>
      ) : (
        <CurveOverlay
          curvesUrl={`/vehicles/${vehicle.id}/curves.json`}
          kind="isolation"
          exportContext={{ vehicle: `${vehicle.name} (${vehicle.identifier})` }}
        />
      )}
    </section>
  );
}

/**
 * The overlay's curves are cached for 30 s (root.tsx); a newly finished analysis refreshes them.
 * `logs` are the vehicle's drive logs with their live status.
 */
export function useCurvesRefresh(logs: readonly { id: number; status: string }[]) {
  const queryClient = useQueryClient();
  const finished = logs
    .filter((l) => l.status === "done")
    .map((l) => l.id)
    .join(",");
  const seenFinished = useRef(finished);
  useEffect(() => {
    if (seenFinished.current === finished) return;
    seenFinished.current = finished;
    void queryClient.invalidateQueries({ queryKey: ["curves"] });
  }, [finished, queryClient]);
}
