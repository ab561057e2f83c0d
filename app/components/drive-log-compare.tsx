import { Form, useNavigate } from "react-router";
import { MAX_COMPARE, type DriveLogTableRow } from "./drive-log-table-state";
import { linkClass } from "./form-fields";

/**
 * "Compare selected" under the drive-log filters: opens the comparison of the selected analysed
 * drive logs (2 to MAX_COMPARE) and says why not otherwise. Without JavaScript it is a GET form
 * the vehicle page's loader turns into the comparison.
 */
export function CompareSelected({
  vehicleId,
  selected,
  hydrated,
  onClear,
}: {
  vehicleId: number;
  /** The selected drive logs that are shown by the filters and analysed, in the table's order. */
  selected: readonly DriveLogTableRow[];
  hydrated: boolean;
  onClear: () => void;
}) {
  const navigate = useNavigate();
  const canCompare = selected.length >= 2 && selected.length <= MAX_COMPARE;
  const compareHint =
    selected.length > MAX_COMPARE
      ? `A comparison takes at most ${MAX_COMPARE} drive logs; ${selected.length} are selected.`
      : selected.length === 1
        ? "Select at least one more analysed drive log to compare."
        : canCompare
          ? `${selected.length} drive logs selected.`
          : `Select 2 to ${MAX_COMPARE} analysed drive logs to compare them.`;
  return (
    <Form
      method="get"
      action={`/vehicles/${vehicleId}`}
      id="compare-logs"
      className="flex flex-wrap items-center gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        if (canCompare)
          void navigate(
            `/vehicles/${vehicleId}/compare?logs=${selected.map((r) => r.id).join(",")}`,
          );
      }}
    >
      {/* Without JavaScript the page's loader turns ?compare=1&logs=…&logs=… into the comparison. */}
      <input type="hidden" name="compare" value="1" />
      <button
        type="submit"
        disabled={hydrated && !canCompare}
        aria-describedby="compare-hint"
        className="inline-flex items-center rounded-md bg-indigo-600 px-3 py-1.5 text-sm font-medium text-white hover:bg-indigo-700 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600 disabled:cursor-not-allowed disabled:bg-neutral-300 disabled:text-neutral-600"
      >
        Compare selected{selected.length ? ` (${selected.length})` : ""}
      </button>
      <span id="compare-hint" className="text-sm text-neutral-600" aria-live="polite">
        {hydrated
          ? compareHint
          : `Tick 2 to ${MAX_COMPARE} analysed drive logs, then compare them.`}
      </span>
      {selected.length ? (
        <button type="button" className={`${linkClass} text-sm`} onClick={onClear}>
          Clear selection
        </button>
      ) : null}
    </Form>
  );
}
