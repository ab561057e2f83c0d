import { useMemo } from "react";
import { Form } from "react-router";
import { conditionLabels, gearLabel, LOG_CONDITIONS } from "~/lib/domain/drive-log-terms";
import { FORM_ID } from "./drive-log-columns";
import {
  gearKey,
  VERDICTS,
  type DriveLogTableRow,
  type Filters,
  type Params,
} from "./drive-log-table-state";
import { inputClass } from "./form-fields";

/**
 * The filters above the drive-log table: labelled selects and date inputs that apply at once
 * with JavaScript, and a plain GET form (with an "Apply filters" button) without it. Only the
 * conditions, gears and damper variants the vehicle's drive logs have are offered.
 */
export function DriveLogFilters({
  rows,
  filters,
  sortValue,
  hydrated,
  onChange,
}: {
  rows: readonly DriveLogTableRow[];
  filters: Filters;
  sortValue: string;
  hydrated: boolean;
  onChange: (patch: Partial<Params>) => void;
}) {
  const options = useMemo(() => {
    const conditions = LOG_CONDITIONS.filter(
      (c) => rows.some((r) => r.condition === c) || filters.condition === c,
    );
    const gears = [...new Set(rows.map((r) => r.gear))].sort((a, b) => (a ?? 99) - (b ?? 99));
    const variants = [...new Set(rows.map((r) => r.damperVariant))].sort((a, b) =>
      a.localeCompare(b),
    );
    return { conditions, gears, variants };
  }, [rows, filters.condition]);

  const label = "block text-xs font-medium text-neutral-700";
  const select = `mt-1 ${inputClass} py-1.5`;
  return (
    <Form
      method="get"
      id={FORM_ID}
      role="search"
      aria-label="Filter drive logs"
      preventScrollReset
      className="grid gap-3 sm:grid-cols-3 lg:grid-cols-6"
      onSubmit={(e) => e.preventDefault()}
    >
      <input type="hidden" name="sort" value={sortValue} />
      <div>
        <label htmlFor="filter-condition" className={label}>
          Condition
        </label>
        <select
          id="filter-condition"
          name="condition"
          className={select}
          value={filters.condition}
          onChange={(e) => onChange({ condition: e.target.value })}
        >
          <option value="">All conditions</option>
          {options.conditions.map((c) => (
            <option key={c} value={c}>
              {conditionLabels[c]}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="filter-gear" className={label}>
          Gear
        </label>
        <select
          id="filter-gear"
          name="gear"
          className={select}
          value={filters.gear}
          onChange={(e) => onChange({ gear: e.target.value })}
        >
          <option value="">All gears</option>
          {options.gears.map((g) => (
            <option key={gearKey(g)} value={gearKey(g)}>
              {g === null ? "No gear given" : gearLabel(g)}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="filter-variant" className={label}>
          Damper variant
        </label>
        <select
          id="filter-variant"
          name="variant"
          className={select}
          value={filters.variant}
          onChange={(e) => onChange({ variant: e.target.value })}
        >
          <option value="">All variants</option>
          {options.variants.map((v) => (
            <option key={v} value={v}>
              {v}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="filter-from" className={label}>
          From date
        </label>
        <input
          id="filter-from"
          type="date"
          name="from"
          className={select}
          value={filters.from}
          max={filters.to || undefined}
          onChange={(e) => onChange({ from: e.target.value })}
        />
      </div>
      <div>
        <label htmlFor="filter-to" className={label}>
          To date
        </label>
        <input
          id="filter-to"
          type="date"
          name="to"
          className={select}
          value={filters.to}
          min={filters.from || undefined}
          onChange={(e) => onChange({ to: e.target.value })}
        />
      </div>
      <div>
        <label htmlFor="filter-verdict" className={label}>
          Verdict
        </label>
        <select
          id="filter-verdict"
          name="verdict"
          className={select}
          value={filters.verdict}
          onChange={(e) => onChange({ verdict: e.target.value })}
        >
          <option value="">Any verdict</option>
          {VERDICTS.map((v) => (
            <option key={v.value} value={v.value}>
              {v.label}
            </option>
          ))}
        </select>
      </div>
      {hydrated ? null : (
        <div className="flex items-end gap-3 sm:col-span-3 lg:col-span-6">
          <button
            type="submit"
            className="rounded-md border border-neutral-300 bg-white px-3 py-1.5 text-sm font-medium hover:bg-neutral-50"
          >
            Apply filters
          </button>
        </div>
      )}
    </Form>
  );
}
