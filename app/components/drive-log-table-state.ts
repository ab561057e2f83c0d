import type { SortingState } from "@tanstack/react-table";
import type { LogCondition, LogState } from "~/lib/domain/drive-log-terms";

// The drive-log table's rows and its state (filters, sort, page) as URL parameters: pure, so the
// same rules hold on the server render, in the browser and in the unit tests.

/** One drive log in the vehicle page's table: its test details and its latest analysis summary. */
export interface DriveLogTableRow {
  id: number;
  fileName: string;
  condition: LogCondition;
  gear: number | null;
  damperVariant: string;
  /** The test date (YYYY-MM-DD), else the upload day (UTC). */
  date: string;
  dateIsUpload: boolean;
  /** ISO time of the upload; orders logs of the same day. */
  uploadedAt: string;
  status: LogState;
  progress: number;
  stage: string | null;
  problem: string | null;
  /** Isolation at the firing order over the log's engine-speed range (bins above the noise), dB; rpm. */
  isolation: {
    minDb: number | null;
    maxDb: number | null;
    rpmMin: number | null;
    rpmMax: number | null;
  } | null;
  /** The rattle check at idle: the larger of the firing-order amplitude and the peak, rad/s². */
  rattle: { verdict: "ok" | "over-limit"; valueRadS2: number } | null;
  /** Target verdicts of the latest analysis; null until it has finished. `failedNames` carry their margins. */
  targets: { passed: number; failed: number; notCovered: number; failedNames: string[] } | null;
}

/** The search parameters the table keeps its state in (a filtered view can be bookmarked). */
export const FILTER_KEYS = ["condition", "gear", "variant", "from", "to", "verdict"] as const;
export const TABLE_PARAMS: readonly string[] = [...FILTER_KEYS, "sort", "page"];
export type Filters = Record<(typeof FILTER_KEYS)[number], string>;

export const PAGE_SIZE = 20;
export const MAX_COMPARE = 8;

export const VERDICTS = [
  { value: "over", label: "Anything failed (target or rattle)" },
  { value: "targets-failed", label: "A target failed" },
  { value: "targets-passed", label: "Every target passed" },
  { value: "rattle-over", label: "Rattle over the limit" },
  { value: "rattle-ok", label: "Rattle below the limit" },
  { value: "not-analysed", label: "Not analysed (running or failed)" },
] as const;

export const isIdle = (c: LogCondition) => c === "idle-neutral" || c === "idle-in-gear";

export const gearKey = (g: number | null) => (g === null ? "none" : String(g));

/** The rows that pass the filters (exact matches; the date range includes both ends). */
export function filterRows(rows: readonly DriveLogTableRow[], f: Filters): DriveLogTableRow[] {
  return rows.filter((r) => {
    if (f.condition && r.condition !== f.condition) return false;
    if (f.gear && gearKey(r.gear) !== f.gear) return false;
    if (f.variant && r.damperVariant !== f.variant) return false;
    if (f.from && r.date < f.from) return false;
    if (f.to && r.date > f.to) return false;
    switch (f.verdict) {
      case "over":
        return (r.targets?.failed ?? 0) > 0 || r.rattle?.verdict === "over-limit";
      case "targets-failed":
        return (r.targets?.failed ?? 0) > 0;
      case "targets-passed":
        return (
          !!r.targets &&
          r.targets.passed > 0 &&
          r.targets.failed === 0 &&
          r.targets.notCovered === 0
        );
      case "rattle-over":
        return r.rattle?.verdict === "over-limit";
      case "rattle-ok":
        return r.rattle?.verdict === "ok";
      case "not-analysed":
        return r.status !== "done";
      default:
        return true;
    }
  });
}

export type Params = Record<string, string>;

/** The table's parameters of a URL; a repeated one (a no-JS form with a sort button) counts its last value. */
export function tableParams(search: URLSearchParams): Params {
  const out: Params = {};
  for (const k of TABLE_PARAMS) {
    const v = search.getAll(k).at(-1);
    if (v) out[k] = v;
  }
  return out;
}

export function readState(params: Params) {
  const filters = Object.fromEntries(FILTER_KEYS.map((k) => [k, params[k] ?? ""])) as Filters;
  for (const k of ["from", "to"] as const)
    if (!/^\d{4}-\d{2}-\d{2}$/.test(filters[k])) filters[k] = "";
  const [id = "", dir] = (params.sort ?? "").split(".");
  // An unknown column is the default order: newest first.
  const sorting: SortingState = COLUMN_IDS.includes(id)
    ? [{ id, desc: dir !== "asc" }]
    : [{ id: "date", desc: true }];
  const page = Math.max(1, Math.floor(Number(params.page) || 1));
  return { filters, sorting, page };
}

/**
 * Writes the table's state into the address bar without a navigation: a React Router navigation
 * would run the parent routes' loaders on every filter change. React Router's own entry in
 * history.state is kept. Notices of an earlier form post (?uploaded=…) go once the view changes.
 */
export function mirror(params: Params) {
  const url = new URL(window.location.href);
  const current = tableParams(url.searchParams);
  const same =
    Object.keys(current).length === Object.keys(params).length &&
    Object.entries(params).every(([k, v]) => current[k] === v);
  if (same) return;
  for (const k of [...TABLE_PARAMS, "uploaded", "dup", "notice"]) url.searchParams.delete(k);
  for (const [k, v] of Object.entries(params)) url.searchParams.set(k, v);
  window.history.replaceState(window.history.state, "", url.pathname + url.search + url.hash);
}

export const COLUMN_IDS = [
  "date",
  "fileName",
  "condition",
  "gear",
  "damperVariant",
  "status",
  "isolation",
  "rattle",
  "targets",
];
