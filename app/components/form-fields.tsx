import {
  getInputProps,
  getSelectProps,
  getTextareaProps,
  type FieldMetadata,
} from "@conform-to/react";

// Fields for longer forms (vehicles, drive-log metadata): a unit beside the label, a hint, and
// the error tied to the control with aria-describedby — the same look as form.tsx's Field.

export const inputClass =
  "block w-full rounded-md border border-neutral-300 bg-white px-3 py-2 text-sm shadow-xs " +
  "focus:border-indigo-600 focus:outline-2 focus:outline-indigo-600/30 " +
  "aria-invalid:border-red-600";

// conform's metadata types differ per field; the fields only read names, ids and errors.
type AnyMeta = FieldMetadata<any>; // eslint-disable-line @typescript-eslint/no-explicit-any

function Label({ meta, label, unit }: { meta: AnyMeta; label: string; unit?: string }) {
  return (
    <label htmlFor={meta.id} className="block text-sm font-medium text-neutral-800">
      {label}
      {unit ? <span className="ml-1 font-normal text-neutral-500">({unit})</span> : null}
    </label>
  );
}

function Under({ meta, hint }: { meta: AnyMeta; hint?: React.ReactNode }) {
  // allErrors: an array field (gear ratios) reports its items' errors under its own name.
  const errors = Object.values(meta.allErrors ?? {}).flat();
  return (
    <>
      {hint ? (
        <p id={`${meta.id}-hint`} className="mt-1 text-xs text-neutral-500">
          {hint}
        </p>
      ) : null}
      {errors.length ? (
        <p id={meta.errorId} className="mt-1 text-sm text-red-700">
          {errors.join(" ")}
        </p>
      ) : null}
    </>
  );
}

function describedBy(meta: AnyMeta, hint: unknown) {
  const ids = [hint ? `${meta.id}-hint` : null, meta.errors?.length ? meta.errorId : null];
  return ids.filter(Boolean).join(" ") || undefined;
}

/** A text or number input; numbers are typed as text with a decimal keypad (no spinner). */
export function InputField({
  label,
  meta,
  unit,
  hint,
  numeric,
  type = "text",
}: {
  label: string;
  meta: AnyMeta;
  unit?: string;
  hint?: React.ReactNode;
  numeric?: boolean;
  type?: "text" | "date";
}) {
  const props = getInputProps(meta, { type });
  return (
    <div>
      <Label meta={meta} label={label} unit={unit} />
      <input
        {...props}
        key={props.key}
        inputMode={numeric ? "decimal" : undefined}
        aria-describedby={describedBy(meta, hint)}
        className={`mt-1 ${inputClass}`}
      />
      <Under meta={meta} hint={hint} />
    </div>
  );
}

export function TextAreaField({
  label,
  meta,
  hint,
  rows = 3,
}: {
  label: string;
  meta: AnyMeta;
  hint?: React.ReactNode;
  rows?: number;
}) {
  const props = getTextareaProps(meta);
  return (
    <div>
      <Label meta={meta} label={label} />
      <textarea
        {...props}
        key={props.key}
        rows={rows}
        aria-describedby={describedBy(meta, hint)}
        className={`mt-1 ${inputClass}`}
      />
      <Under meta={meta} hint={hint} />
    </div>
  );
}

export function ChoiceField({
  label,
  meta,
  options,
  hint,
}: {
  label: string;
  meta: AnyMeta;
  options: readonly { value: string; label: string }[];
  hint?: React.ReactNode;
}) {
  const props = getSelectProps(meta);
  return (
    <div>
      <Label meta={meta} label={label} />
      <select
        {...props}
        key={props.key}
        aria-describedby={describedBy(meta, hint)}
        className={`mt-1 ${inputClass}`}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <Under meta={meta} hint={hint} />
    </div>
  );
}

export const fieldsetClass = "rounded-lg border border-neutral-200 bg-white p-5 shadow-xs";
export const legendClass = "px-1 text-sm font-semibold text-neutral-900";

export const linkClass =
  "text-indigo-700 underline underline-offset-4 hover:text-indigo-900 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600 rounded-sm";

export const buttonLinkClass =
  "inline-flex items-center justify-center rounded-md px-4 py-2 text-sm font-medium focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600";
