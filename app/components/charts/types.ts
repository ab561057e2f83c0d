/**
 * The contract between the pages and the chart components (app/components/charts/). Pages pass
 * URLs of JSON resource routes; the components fetch them with TanStack Query, draw on the
 * client only (uPlot, plus a plain canvas for the order maps) and size themselves to their
 * container.
 */
import type { ChartData } from "~/lib/domain/chart-data";

/** What GET …/charts.json answers (app/routes/drive-log.charts.ts, and share links). */
export interface ChartsResponse {
  logId: number;
  analysis: { id: number; version: number; createdAt: string };
  charts: ChartData;
}

/**
 * Where a chart's figures come from, written into its PNG export's caption (export-image.ts).
 * Pages give the names; the chart sets add the analysis from their charts.json.
 */
export interface ExportContext {
  /** The vehicle, e.g. "Kestrel D4 (KST-D4)". */
  vehicle?: string;
  /** The drive log's file name, or the drive logs of a comparison. */
  driveLog?: string;
  analysis?: { id: number; version: number; createdAt: string };
}

/** A remark pinned to a time (s) or an engine speed (rpm), drawn as a marker on the charts. */
export interface ChartMarker {
  id: number | string;
  label: string;
  timeS?: number | null;
  rpm?: number | null;
}

/** An isolation target drawn as a band on the isolation curve: at least minDb over rpmFrom–rpmTo. */
export interface TargetBand {
  id: number | string;
  name: string;
  rpmFrom: number;
  rpmTo: number;
  minDb: number;
}

export type { CurveSet, CurvesResponse } from "~/lib/domain/curves";

/** GET …/logs/:logId/channel-preview.json: the picked speeds, decimated; null separates sections. */
export interface SpeedPreviewResponse {
  timeS: number[];
  crankRpm: (number | null)[];
  gearboxRpm: (number | null)[];
}
