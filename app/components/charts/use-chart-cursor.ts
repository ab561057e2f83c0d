import { useCallback, useId, useState } from "react";

/**
 * The shared engine-speed cursor of one set of charts. The engine-speed charts (order curves,
 * isolation curve) join the uPlot sync group `syncKey`, so their cursors move together; each
 * reports the engine speed under its cursor (rpm) through `setRpm`, which the order spectrum and
 * the order maps read. The last position stays when the pointer leaves.
 */
export function useChartCursor() {
  const syncKey = `twistlog-engine-speed-${useId()}`;
  const [rpm, setRpmState] = useState<number | null>(null);
  const setRpm = useCallback((value: number) => {
    if (Number.isFinite(value)) setRpmState((old) => (old === value ? old : value));
  }, []);
  return { syncKey, rpm, setRpm };
}
