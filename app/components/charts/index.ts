/** The chart components (client-only drawing; safe to render on the server as skeletons). */
export { DriveLogCharts } from "./drive-log-charts";
export { RattleCharts } from "./rattle-charts";
export { CurveOverlay, overlayStyle } from "./curve-overlay";
export { useChartCursor } from "./use-chart-cursor";
export { SpeedTrace } from "./speed-trace";
export { OrderCurves } from "./order-curves";
export { IsolationCurve } from "./isolation-curve";
export { OrderMaps } from "./order-map";
export { OrderSpectrum } from "./order-spectrum";
export { TwistCurve } from "./twist-curve";
export type { ChartMarker, ChartsResponse, CurveSet, CurvesResponse, TargetBand } from "./types";
