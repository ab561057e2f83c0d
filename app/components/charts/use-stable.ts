import { useMemo } from "react";
import type { ChartMarker, TargetBand } from "./types";

/**
 * Props that pages may pass as fresh array literals on every render: kept stable by content so
 * the charts are not rebuilt each time.
 */
function useByContent<T>(value: T): T {
  const key = JSON.stringify(value ?? null);
  // eslint-disable-next-line react-hooks/exhaustive-deps
  return useMemo(() => value, [key]);
}

export function useTimeMarkers(markers: ChartMarker[] | undefined) {
  const stable = useByContent(markers);
  return useMemo(
    () =>
      (stable ?? []).flatMap((m) =>
        typeof m.timeS === "number" && Number.isFinite(m.timeS)
          ? [{ at: m.timeS, label: m.label }]
          : [],
      ),
    [stable],
  );
}

export function useRpmMarkers(markers: ChartMarker[] | undefined) {
  const stable = useByContent(markers);
  return useMemo(
    () =>
      (stable ?? []).flatMap((m) =>
        typeof m.rpm === "number" && Number.isFinite(m.rpm) ? [{ at: m.rpm, label: m.label }] : [],
      ),
    [stable],
  );
}

export function useTargets(targets: TargetBand[] | undefined): TargetBand[] {
  const stable = useByContent(targets);
  return useMemo(() => stable ?? [], [stable]);
}
