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

const labelClass = "block text-xs font-medium text-neutral-700";
const controlClass = `mt-1 ${inputClass} py-1.5`;

/** What every filter control gets: the current filters, and the change to write. */
interface FilterProps {
  filters: Filters;
  onChange: (patch: Partial<Params>) => void;
}

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

  const field = { filters, onChange };
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
      <FilterSelect
        {...field}
        name="condition"
        label="Condition"
        all="All conditions"
        options={options.conditions.map((c) => ({ value: c, label: conditionLabels[c] }))}
      />
      <FilterSelect
        {...field}
        name="gear"
        label="Gear"
        all="All gears"
        options={options.gears.map((g) => ({
          value: gearKey(g),
          label: g === null ? "No gear given" : gearLabel(g),
        }))}
      />
      <FilterSelect
        {...field}
        name="variant"
        label="Damper variant"
        all="All variants"
        options={options.variants.map((v) => ({ value: v, label: v }))}
      />
      <FilterDate {...field} name="from" label="From date" max={filters.to} />
      <FilterDate {...field} name="to" label="To date" min={filters.from} />
      <FilterSelect
        {...field}
        name="verdict"
        label="Verdict"
        all="Any verdict"
        options={VERDICTS}
      />
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

/** One labelled select of the filters; the first option ("All …") clears the filter. */
function FilterSelect({
  filters,
  onChange,
  name,
  label,
  all,
  options,
}: FilterProps & {
  name: keyof Filters;
  label: string;
  all: string;
  options: readonly { value: string; label: string }[];
}) {
  const id = `filter-${name}`;
  return (
    <div>
      <label htmlFor={id} className={labelClass}>
        {label}
      </label>
      <select
        id={id}
        name={name}
        className={controlClass}
        value={filters[name]}
        onChange={(e) => onChange({ [name]: e.target.value })}
      >
        <option value="">{all}</option>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </div>
  );
}

/** One labelled date input of the filters; `min`/`max` keep the range in order. */
function FilterDate({
  filters,
  onChange,
  name,
  label,
  min,
  max,
}: FilterProps & { name: "from" | "to"; label: string; min?: string; max?: string }) {
  const id = `filter-${name}`;
  return (
    <div>
      <label htmlFor={id} className={labelClass}>
        {label}
      </label>
      <input
        id={id}
        type="date"
        name={name}
        className={controlClass}
        value={filters[name]}
        min={min || undefined}
        max={max || undefined}
        onChange={(e) => onChange({ [name]: e.target.value })}
      />
    </div>
  );
}
