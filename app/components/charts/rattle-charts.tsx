import { useId } from "react";
import { ChartsError } from "./chart-frame";
import { ChartExportContext } from "./export-context";
import { AccelChart } from "./rattle-accel";
import { FluctuationChart } from "./rattle-fluctuation";
import { useChartsQuery } from "./queries";
import type { ChartMarker, ExportContext } from "./types";

/** The rattle check's charts: |α| at the gearbox input against its limit, and the firing-order fluctuation. */
export function RattleCharts({
  chartsUrl,
  markers,
  analysisVersion,
  exportContext,
}: {
  chartsUrl: string;
  markers?: ChartMarker[];
  /** As for DriveLogCharts: the latest analysis version the page knows of. */
  analysisVersion?: number;
  /** As for DriveLogCharts: the vehicle and drive log named in the PNG exports' caption. */
  exportContext?: Pick<ExportContext, "vehicle" | "driveLog">;
}) {
  const query = useChartsQuery(chartsUrl, analysisVersion);
  const syncKey = `twistlog-time-${useId()}`;
  const charts = query.data?.charts ?? null;
  const suffix = query.data ? `log-${query.data.logId}-v${query.data.analysis.version}` : undefined;
  const exportValue = { ...exportContext, analysis: query.data?.analysis };
  if (query.isError)
    return (
      <section aria-label="Rattle check charts" data-charts="rattle" data-status="error">
        <ChartsError error={query.error} onRetry={() => void query.refetch()} />
      </section>
    );
  return (
    <section
      aria-label="Rattle check charts"
      data-charts="rattle"
      data-status={charts ? "ready" : "loading"}
      className="space-y-6"
    >
      <ChartExportContext.Provider value={exportValue}>
        <AccelChart charts={charts} markers={markers} syncKey={syncKey} fileSuffix={suffix} />
        <FluctuationChart charts={charts} markers={markers} syncKey={syncKey} fileSuffix={suffix} />
      </ChartExportContext.Provider>
    </section>
  );
}
