import {
  flexRender,
  getCoreRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type RowSelectionState,
} from "@tanstack/react-table";
import { useEffect, useMemo, useState } from "react";
import { Link, useLocation, useSearchParams } from "react-router";
import { columns, SortButton, sortLabel, type TableMeta } from "./drive-log-columns";
import { CompareSelected } from "./drive-log-compare";
import { DriveLogFilters } from "./drive-log-filters";
import { Pager } from "./drive-log-pager";
import {
  filterRows,
  FILTER_KEYS,
  mirror,
  PAGE_SIZE,
  readState,
  tableParams,
  type DriveLogTableRow,
  type Params,
} from "./drive-log-table-state";
import { linkClass } from "./form-fields";
import type { LogProgress } from "./log-status";
import { EmptyState } from "./page";
import { ScrollArea } from "./scroll-area";
import { useHydrated } from "./use-hydrated";

export { TABLE_PARAMS, type DriveLogTableRow } from "./drive-log-table-state";

/**
 * The vehicle page's drive logs (docs/ui.md, vehicle page item 3): TanStack Table for sorting,
 * paging and row selection; filters above it. Its state is mirrored into the URL
 * (?condition=…&sort=…&page=…) so a filtered view can be bookmarked, and every control also
 * works as a plain GET form before JavaScript runs.
 */
export function DriveLogTable({
  vehicleId,
  vehicleIdentifier,
  rows,
  statuses,
  hasTargets,
  canUpload,
}: {
  vehicleId: number;
  vehicleIdentifier: string;
  rows: DriveLogTableRow[];
  statuses: Map<number, LogProgress>;
  hasTargets: boolean;
  canUpload: boolean;
}) {
  const [search] = useSearchParams();
  const location = useLocation();
  const hydrated = useHydrated();
  // The state starts from the URL (so a bookmarked view opens as it was) and then lives here.
  const [params, setParams] = useState<Params>(() => tableParams(search));
  const { filters, sorting, page } = useMemo(() => readState(params), [params]);
  const [rowSelection, setRowSelection] = useState<RowSelectionState>({});
  // Also after React Router navigates (a form post on the page resets the address to its own).
  useEffect(() => mirror(params), [params, location.key]);

  const filtered = useMemo(() => filterRows(rows, filters), [rows, filters]);
  const pageCount = Math.max(1, Math.ceil(filtered.length / PAGE_SIZE));
  const pageIndex = Math.min(page, pageCount) - 1;

  function write(patch: Partial<Params>) {
    setParams((prev) => {
      const next = { ...prev };
      for (const [k, v] of Object.entries(patch)) {
        if (v) next[k] = v;
        else delete next[k];
      }
      if (!("page" in patch)) delete next.page;
      return next;
    });
  }
  const resetFilters = () => setParams((prev): Params => (prev.sort ? { sort: prev.sort } : {}));
  const resetHref = `${location.pathname}${params.sort ? `?sort=${encodeURIComponent(params.sort)}` : ""}`;

  const table = useReactTable({
    data: filtered,
    columns,
    getRowId: (r) => String(r.id),
    state: { sorting, pagination: { pageIndex, pageSize: PAGE_SIZE }, rowSelection },
    onSortingChange: (updater) => {
      const next = typeof updater === "function" ? updater(sorting) : updater;
      const first = next[0];
      write({ sort: first ? `${first.id}.${first.desc ? "desc" : "asc"}` : "" });
    },
    onPaginationChange: (updater) => {
      const next =
        typeof updater === "function" ? updater({ pageIndex, pageSize: PAGE_SIZE }) : updater;
      write({ page: next.pageIndex > 0 ? String(next.pageIndex + 1) : "" });
    },
    onRowSelectionChange: setRowSelection,
    enableRowSelection: (row) =>
      (statuses.get(row.original.id)?.status ?? row.original.status) === "done",
    enableSortingRemoval: false,
    enableMultiSort: false,
    autoResetPageIndex: false,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    meta: { vehicleId, statuses, hasTargets } satisfies TableMeta,
  });

  // Selected drive logs that are shown by the filters and analysed, in the table's order.
  const selected = table
    .getSortedRowModel()
    .rows.filter((r) => r.getIsSelected() && r.getCanSelect())
    .map((r) => r.original);

  const filtering = FILTER_KEYS.some((k) => filters[k]);
  const [sort] = sorting;
  const first = filtered.length ? pageIndex * PAGE_SIZE + 1 : 0;
  const last = Math.min(filtered.length, (pageIndex + 1) * PAGE_SIZE);

  if (rows.length === 0)
    return (
      <EmptyState>
        No drive logs yet —{" "}
        {canUpload
          ? "upload one below, with its test condition."
          : "a technician or engineer uploads them after a test run."}
      </EmptyState>
    );

  return (
    <div className="space-y-4">
      <DriveLogFilters
        rows={rows}
        filters={filters}
        sortValue={`${sort!.id}.${sort!.desc ? "desc" : "asc"}`}
        hydrated={hydrated}
        onChange={write}
      />

      <div className="flex flex-wrap items-center justify-between gap-3">
        <CompareSelected
          vehicleId={vehicleId}
          selected={selected}
          hydrated={hydrated}
          onClear={() => setRowSelection({})}
        />
        {filtering && filtered.length > 0 ? (
          <ResetFilters
            href={resetHref}
            onReset={resetFilters}
            className={`${linkClass} text-sm`}
          />
        ) : null}
      </div>

      {filtered.length === 0 ? (
        <div className="rounded-md border border-dashed border-neutral-300 px-4 py-6 text-center text-sm text-neutral-600">
          <p>No drive logs match these filters.</p>
          <ResetFilters
            href={resetHref}
            onReset={resetFilters}
            className="mt-3 inline-flex items-center rounded-md border border-neutral-300 bg-white px-3 py-1.5 text-sm font-medium text-neutral-800 hover:bg-neutral-50"
          />
        </div>
      ) : (
        <ScrollArea label="Drive logs">
          <table className="w-full text-left text-sm">
            <caption className="caption-top pb-2 text-left text-sm text-neutral-600">
              {/* As wide as the screen shows, not as the table: on a phone the table scrolls. */}
              <span className="block max-w-[calc(100vw-6rem)] sm:max-w-none">
                Drive logs of {vehicleIdentifier}: {first}–{last} of {filtered.length}
                {filtering ? ` matching the filters (${rows.length} in all)` : ""}, sorted by{" "}
                {sortLabel(sort!.id, sort!.desc)}.
              </span>
            </caption>
            <thead>
              {table.getHeaderGroups().map((group) => (
                <tr key={group.id}>
                  {group.headers.map((h) => {
                    const sorted = h.column.getIsSorted();
                    const sortable = h.column.id !== "select";
                    return (
                      <th
                        key={h.id}
                        scope="col"
                        aria-sort={
                          sortable
                            ? sorted === "asc"
                              ? "ascending"
                              : sorted === "desc"
                                ? "descending"
                                : "none"
                            : undefined
                        }
                        className={`border-b border-neutral-200 py-2 pr-2 align-bottom font-medium text-neutral-600 xl:pr-3 ${h.column.id === "select" ? "w-8" : ""}`}
                      >
                        {sortable ? (
                          <SortButton column={h.column} label={String(h.column.columnDef.header)} />
                        ) : (
                          flexRender(h.column.columnDef.header, h.getContext())
                        )}
                      </th>
                    );
                  })}
                </tr>
              ))}
            </thead>
            <tbody>
              {table.getRowModel().rows.map((row) => (
                <tr
                  key={row.id}
                  data-log-id={row.original.id}
                  className={row.getIsSelected() ? "bg-indigo-50/60" : "hover:bg-neutral-50"}
                >
                  {row.getVisibleCells().map((cell) => (
                    <td
                      key={cell.id}
                      className="border-b border-neutral-100 py-2.5 pr-2 align-top xl:pr-3"
                    >
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollArea>
      )}

      {filtered.length > PAGE_SIZE ? (
        <Pager
          pageIndex={pageIndex}
          pageCount={pageCount}
          canPrevious={table.getCanPreviousPage()}
          canNext={table.getCanNextPage()}
          onPrevious={() => table.previousPage()}
          onNext={() => table.nextPage()}
        />
      ) : null}
      <p role="status" className="sr-only">
        {filtering ? `${filtered.length} of ${rows.length} drive logs match the filters.` : ""}
      </p>
    </div>
  );
}

/** "Reset filters": clears the filters in place, or follows the plain link without JavaScript. */
function ResetFilters({
  href,
  onReset,
  className,
}: {
  href: string;
  onReset: () => void;
  className: string;
}) {
  return (
    <Link
      to={href}
      replace
      preventScrollReset
      onClick={(e) => {
        e.preventDefault();
        onReset();
      }}
      className={className}
    >
      Reset filters
    </Link>
  );
}
