import { useMemo } from "react";
import { ChartsError } from "./chart-frame";
import { ChartExportContext } from "./export-context";
import { IsolationCurve } from "./isolation-curve";
import { OrderCurves } from "./order-curves";
import { OrderMaps } from "./order-map";
import { OrderSpectrum } from "./order-spectrum";
import { useChartsQuery } from "./queries";
import { SpeedTrace } from "./speed-trace";
import { TwistCurve } from "./twist-curve";
import type { ChartMarker, ExportContext, TargetBand } from "./types";
import { useChartCursor } from "./use-chart-cursor";

/**
 * The drive-log page's charts, in the order of docs/ui.md: speed trace; order curves | isolation
 * curve, then the twist curve, sharing one engine-speed cursor; the order maps; the order
 * spectrum at the cursor.
 */
export function DriveLogCharts({
  chartsUrl,
  markers,
  targets,
  caption,
  analysisVersion,
  exportContext,
}: {
  chartsUrl: string;
  /** The latest analysis version the page knows of: a new one refetches (see useChartsQuery). */
  analysisVersion?: number;
  markers?: ChartMarker[];
  targets?: TargetBand[];
  caption?: React.ReactNode;
  /** The vehicle and drive log named in the PNG exports' caption (the analysis is added here). */
  exportContext?: Pick<ExportContext, "vehicle" | "driveLog">;
}) {
  const query = useChartsQuery(chartsUrl, analysisVersion);
  const cursor = useChartCursor();
  const charts = query.data?.charts ?? null;
  const suffix = query.data ? `log-${query.data.logId}-v${query.data.analysis.version}` : undefined;
  const analysis = query.data?.analysis;
  const exportValue = useMemo(
    () => ({ ...exportContext, analysis }),
    [exportContext?.vehicle, exportContext?.driveLog, analysis], // eslint-disable-line react-hooks/exhaustive-deps
  );

  if (query.isError)
    return (
      <section aria-label="Charts" data-charts="drive-log" data-status="error">
        <ChartsError error={query.error} onRetry={() => void query.refetch()} />
      </section>
    );

  return (
    <section
      aria-label="Charts"
      data-charts="drive-log"
      data-status={charts ? "ready" : "loading"}
      className="space-y-6"
    >
      <ChartExportContext.Provider value={exportValue}>
        {caption ? <div className="text-sm text-neutral-600">{caption}</div> : null}
        <SpeedTrace charts={charts} markers={markers} fileSuffix={suffix} />
        <div className="grid gap-6 lg:grid-cols-2">
          <OrderCurves
            charts={charts}
            syncKey={cursor.syncKey}
            onCursorRpm={cursor.setRpm}
            markers={markers}
            fileSuffix={suffix}
          />
          <IsolationCurve
            charts={charts}
            syncKey={cursor.syncKey}
            onCursorRpm={cursor.setRpm}
            markers={markers}
            targets={targets}
            fileSuffix={suffix}
          />
        </div>
        <TwistCurve
          charts={charts}
          syncKey={cursor.syncKey}
          onCursorRpm={cursor.setRpm}
          fileSuffix={suffix}
        />
        <OrderMaps charts={charts} cursorRpm={cursor.rpm} fileSuffix={suffix} />
        <OrderSpectrum charts={charts} cursorRpm={cursor.rpm} fileSuffix={suffix} />
      </ChartExportContext.Provider>
    </section>
  );
}
