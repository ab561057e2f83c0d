import { createContext, useContext } from "react";
import type { ExportContext } from "./types";

/**
 * The export context of a set of charts (vehicle, drive log, analysis), provided once by
 * DriveLogCharts, RattleCharts or CurveOverlay so each chart's PNG carries it in its caption.
 */
export const ChartExportContext = createContext<ExportContext>({});

export function useExportContext(): ExportContext {
  return useContext(ChartExportContext);
}
