import { createColumnHelper, type Column, type Table } from "@tanstack/react-table";
import { useEffect, useRef } from "react";
import { Link } from "react-router";
import { conditionLabels, type LogState } from "~/lib/domain/drive-log-terms";
import { dbRangeText, radS2Text, rpmRangeText } from "~/lib/domain/format";
import { gearLabel } from "~/lib/domain/drive-log-terms";
import { isIdle, type DriveLogTableRow } from "./drive-log-table-state";
import { linkClass } from "./form-fields";
import { LogStatus, type LogProgress } from "./log-status";
import { When } from "./page";

// The drive-log table's columns (TanStack Table) and their cells; every figure with its unit.

/** The filter form every header's sort button and the page buttons submit without JavaScript. */
export const FORM_ID = "log-filters";

const statusRank: Record<LogState, number> = { failed: 0, queued: 1, analysing: 2, done: 3 };
const col = createColumnHelper<DriveLogTableRow>();

export interface TableMeta {
  vehicleId: number;
  statuses: Map<number, LogProgress>;
  hasTargets: boolean;
}

export const columns = [
  col.display({
    id: "select",
    header: ({ table }) => <SelectAll table={table} />,
    cell: ({ row }) => (
      <input
        type="checkbox"
        name="logs"
        value={row.original.id}
        form="compare-logs"
        className="size-4 accent-indigo-600"
        checked={row.getIsSelected()}
        disabled={!row.getCanSelect()}
        onChange={row.getToggleSelectedHandler()}
        aria-label={
          row.getCanSelect()
            ? `Select ${row.original.fileName} for comparison`
            : `${row.original.fileName} is not analysed, so it cannot be compared`
        }
      />
    ),
  }),
  col.accessor("date", {
    id: "date",
    header: "Date",
    sortDescFirst: true,
    sortingFn: (a, b) =>
      a.original.date.localeCompare(b.original.date) ||
      a.original.uploadedAt.localeCompare(b.original.uploadedAt) ||
      a.original.id - b.original.id,
    cell: ({ row }) => (
      <span className="whitespace-nowrap">
        <When date={row.original.date} dateOnly />
        {row.original.dateIsUpload ? (
          <span className="block text-xs text-neutral-500">uploaded (no test date)</span>
        ) : null}
      </span>
    ),
  }),
  col.accessor("fileName", {
    id: "fileName",
    header: "Drive log",
    sortingFn: "alphanumeric",
    cell: ({ row, table }) => (
      <Link
        to={`/vehicles/${(table.options.meta as TableMeta).vehicleId}/logs/${row.original.id}`}
        className={`${linkClass} block max-w-40 truncate xl:max-w-72`}
        title={row.original.fileName}
      >
        {row.original.fileName}
      </Link>
    ),
  }),
  col.accessor((r) => conditionLabels[r.condition], {
    id: "condition",
    header: "Condition",
    sortingFn: "text",
  }),
  col.accessor((r) => r.gear ?? undefined, {
    id: "gear",
    header: "Gear",
    sortUndefined: "last",
    cell: ({ row }) => gearLabel(row.original.gear),
  }),
  col.accessor("damperVariant", {
    id: "damperVariant",
    header: "Damper",
    sortingFn: "alphanumeric",
  }),
  col.accessor((r) => statusRank[r.status], {
    id: "status",
    header: "Status",
    cell: ({ row, table }) => {
      const live = (table.options.meta as TableMeta).statuses.get(row.original.id) ?? row.original;
      return (
        <>
          <LogStatus log={live} label={row.original.fileName} />
          {row.original.problem && live.status === "failed" ? (
            <span
              className="mt-0.5 block max-w-48 truncate text-xs text-red-700"
              title={row.original.problem}
            >
              {row.original.problem}
            </span>
          ) : null}
        </>
      );
    },
  }),
  col.accessor((r) => r.isolation?.minDb ?? undefined, {
    id: "isolation",
    header: "Isolation (firing order)",
    sortUndefined: "last",
    cell: ({ row }) => <IsolationCell row={row.original} />,
  }),
  col.accessor((r) => r.rattle?.valueRadS2 ?? undefined, {
    id: "rattle",
    header: "Rattle check",
    sortUndefined: "last",
    cell: ({ row }) => <RattleCell row={row.original} />,
  }),
  col.accessor((r) => (r.targets ? r.targets.failed * 1000 - r.targets.passed : undefined), {
    id: "targets",
    header: "Targets",
    sortUndefined: "last",
    cell: ({ row, table }) => (
      <TargetsCell row={row.original} hasTargets={(table.options.meta as TableMeta).hasTargets} />
    ),
  }),
];

function IsolationCell({ row }: { row: DriveLogTableRow }) {
  const iso = row.isolation;
  if (!iso) return <span className="text-neutral-400">—</span>;
  if (iso.minDb === null || iso.maxDb === null)
    return <span className="text-xs text-neutral-500">no bins above the noise</span>;
  // The same range string, by the same rule, as the drive-log page and its isolation curve.
  const value = dbRangeText(iso.minDb, iso.maxDb);
  const range =
    iso.rpmMin === null || iso.rpmMax === null ? "" : rpmRangeText(iso.rpmMin, iso.rpmMax);
  return (
    <span className="whitespace-nowrap tabular-nums">
      <span className="text-indigo-800">{value}</span>
      {isIdle(row.condition) ? <span className="text-neutral-600"> at idle</span> : null}
      {range ? <span className="block text-xs text-neutral-500">{range}</span> : null}
    </span>
  );
}

function RattleCell({ row }: { row: DriveLogTableRow }) {
  if (row.status !== "done") return <span className="text-neutral-400">—</span>;
  if (!row.rattle) return <span className="text-xs text-neutral-500">no idle segment</span>;
  const over = row.rattle.verdict === "over-limit";
  return (
    <span className="whitespace-nowrap tabular-nums">
      <span className={`font-medium ${over ? "text-red-700" : "text-green-700"}`}>
        {over ? "Over limit" : "OK"}
      </span>
      <span className="block text-xs text-neutral-600">{radS2Text(row.rattle.valueRadS2)}</span>
    </span>
  );
}

function TargetsCell({ row, hasTargets }: { row: DriveLogTableRow; hasTargets: boolean }) {
  if (!hasTargets) return <span className="text-xs text-neutral-500">no targets set</span>;
  const t = row.targets;
  if (!t) return <span className="text-neutral-400">—</span>;
  if (t.passed + t.failed + t.notCovered === 0)
    return <span className="text-xs text-neutral-500">none apply</span>;
  return (
    <span
      className="whitespace-nowrap"
      title={t.failedNames.length ? `Failed: ${t.failedNames.join("; ")}` : undefined}
    >
      <span className="block text-green-700">passed {t.passed}</span>
      <span className={`block ${t.failed ? "font-medium text-red-700" : "text-neutral-600"}`}>
        failed {t.failed}
      </span>
      {t.notCovered ? (
        <span className="block text-xs text-neutral-500">{t.notCovered} not covered</span>
      ) : null}
    </span>
  );
}

function SelectAll({ table }: { table: Table<DriveLogTableRow> }) {
  const ref = useRef<HTMLInputElement>(null);
  const some = table.getIsSomePageRowsSelected();
  const all = table.getIsAllPageRowsSelected();
  useEffect(() => {
    if (ref.current) ref.current.indeterminate = some && !all;
  }, [some, all]);
  const selectable = table.getRowModel().rows.some((r) => r.getCanSelect());
  return (
    <input
      ref={ref}
      type="checkbox"
      className="size-4 accent-indigo-600"
      checked={all && selectable}
      disabled={!selectable}
      onChange={table.getToggleAllPageRowsSelectedHandler()}
      aria-label="Select all analysed drive logs on this page"
    />
  );
}

export function sortLabel(id: string, desc: boolean) {
  const names: Record<string, string> = {
    date: "date",
    fileName: "file name",
    condition: "condition",
    gear: "gear",
    damperVariant: "damper variant",
    status: "status",
    isolation: "least isolation",
    rattle: "rattle figure",
    targets: "failed targets",
  };
  return `${names[id] ?? id}, ${desc ? "descending" : "ascending"}`;
}

/** A header cell's sort button; without JavaScript it submits the filter form with ?sort=. */
export function SortButton({
  column,
  label,
}: {
  column: Column<DriveLogTableRow, unknown>;
  label: string;
}) {
  const sorted = column.getIsSorted();
  const nextDesc = sorted ? sorted === "asc" : !!column.columnDef.sortDescFirst;
  return (
    <button
      type="submit"
      form={FORM_ID}
      name="sort"
      value={`${column.id}.${nextDesc ? "desc" : "asc"}`}
      onClick={(e) => {
        e.preventDefault();
        column.toggleSorting(nextDesc);
      }}
      className="group inline-flex items-center gap-1 rounded-sm text-left font-medium text-neutral-600 hover:text-neutral-900 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600"
    >
      {label}
      <span
        aria-hidden="true"
        className={sorted ? "text-indigo-700" : "text-neutral-300 group-hover:text-neutral-500"}
      >
        {sorted === "asc" ? "▲" : sorted === "desc" ? "▼" : "↕"}
      </span>
    </button>
  );
}
