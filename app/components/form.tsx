import {
  getInputProps,
  getSelectProps,
  useForm,
  type FieldMetadata,
  type SubmissionResult,
} from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { useEffect, useRef } from "react";
import { Form, type FetcherWithComponents } from "react-router";
import type { z } from "zod";
import { CsrfInput } from "./csrf-input";

/**
 * One zod schema per form, used here for the browser's hints and in the action for the real
 * check (docs/conventions.md). After a refused submission the first field with an error gets focus,
 * with and without JavaScript (conform sets autoFocus on it when rendered on the server).
 */
export function useSchemaForm<S extends z.ZodType<unknown, Record<string, unknown>>>(
  id: string,
  schema: S,
  lastResult: SubmissionResult<string[]> | null | undefined,
  defaultValue?: Record<string, string>,
) {
  const [form, fields] = useForm<z.input<S>, z.output<S>, string[]>({
    id,
    lastResult,
    defaultValue: defaultValue as never,
    constraint: {},
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseWithZod(formData, { schema }),
  });
  // Runs after every render: conform shows the returned errors a render after `lastResult`
  // arrives, so the effect waits until there is an invalid field or an alert to focus.
  const seen = useRef<unknown>(null);
  useEffect(() => {
    if (!lastResult || lastResult === seen.current || lastResult.status !== "error") return;
    const element = document.getElementById(id);
    const first =
      element?.querySelector<HTMLElement>('[aria-invalid="true"]') ??
      element?.querySelector<HTMLElement>('[role="alert"]');
    if (!first) return;
    seen.current = lastResult;
    first.focus();
  });
  return [form, fields] as const;
}

const inputClass =
  "block w-full rounded-md border border-neutral-300 bg-white px-3 py-2 text-sm shadow-xs " +
  "focus:border-indigo-600 focus:outline-2 focus:outline-indigo-600/30 " +
  "aria-invalid:border-red-600";

/** A labelled input whose error and hint are tied to it with aria-describedby. */
export function Field({
  label,
  meta,
  type = "text",
  hint,
  autoComplete,
}: {
  label: string;
  meta: FieldMetadata<string | undefined>;
  type?: "text" | "email" | "password" | "date";
  hint?: string;
  autoComplete?: string;
}) {
  const hintId = hint ? `${meta.id}-hint` : undefined;
  const props = getInputProps(meta, { type, ariaDescribedBy: hintId });
  return (
    <div>
      <label htmlFor={meta.id} className="block text-sm font-medium text-neutral-800">
        {label}
      </label>
      <input
        {...props}
        key={props.key}
        autoComplete={autoComplete}
        className={`mt-1 ${inputClass}`}
      />
      {hint ? (
        <p id={hintId} className="mt-1 text-xs text-neutral-500">
          {hint}
        </p>
      ) : null}
      <FieldError id={meta.errorId} errors={meta.errors} />
    </div>
  );
}

export function SelectField({
  label,
  meta,
  options,
}: {
  label: string;
  meta: FieldMetadata<string | undefined>;
  options: { value: string; label: string }[];
}) {
  const props = getSelectProps(meta);
  return (
    <div>
      <label htmlFor={meta.id} className="block text-sm font-medium text-neutral-800">
        {label}
      </label>
      <select {...props} key={props.key} className={`mt-1 ${inputClass}`}>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      <FieldError id={meta.errorId} errors={meta.errors} />
    </div>
  );
}

function FieldError({ id, errors }: { id: string; errors: string[] | undefined }) {
  if (!errors?.length) return null;
  return (
    <p id={id} className="mt-1 text-sm text-red-700">
      {errors.join(" ")}
    </p>
  );
}

/**
 * The frame of a schema form (useSchemaForm): a post with the browser's own checks off (the
 * schema checks instead), the CSRF token, the intent and the `hidden` fields that name its
 * subject, and the form's own error; the fields are the children. With a `fetcher` it posts
 * through it (the page stays); `action` is the route it posts to when not the page's own.
 */
export function SchemaForm<R>({
  form,
  intent,
  hidden,
  fetcher,
  action,
  className,
  children,
}: {
  form: {
    id: string;
    errorId: string;
    errors: string[] | undefined;
    onSubmit: (event: React.FormEvent<HTMLFormElement>) => void;
  };
  intent?: string;
  hidden?: React.ReactNode;
  fetcher?: FetcherWithComponents<R>;
  action?: string;
  className: string;
  children: React.ReactNode;
}) {
  const Frame = fetcher ? fetcher.Form : Form;
  return (
    <Frame
      method="post"
      action={action}
      id={form.id}
      onSubmit={form.onSubmit}
      noValidate
      className={className}
    >
      <CsrfInput />
      {intent ? <input type="hidden" name="intent" value={intent} /> : null}
      {hidden}
      <FormError id={form.errorId} errors={form.errors} />
      {children}
    </Frame>
  );
}

/** Errors of the whole form (e.g. a refused sign-in), announced to screen readers. */
export function FormError({ id, errors }: { id: string; errors: string[] | undefined }) {
  if (!errors?.length) return null;
  return (
    <div
      id={id}
      role="alert"
      tabIndex={-1}
      className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800"
    >
      {errors.join(" ")}
    </div>
  );
}

/** A refusal in one line where there is no form error to tie it to (e.g. a fetcher's reply). */
export function ErrorLine({ message }: { message: string }) {
  return (
    <p
      role="alert"
      className="rounded-md border border-red-200 bg-red-50 px-3 py-2 text-sm text-red-800"
    >
      {message}
    </p>
  );
}

export function SubmitButton({
  children,
  name,
  value,
  tone = "primary",
  disabled,
}: {
  children: React.ReactNode;
  name?: string;
  value?: string;
  tone?: "primary" | "secondary" | "danger";
  /** For a form that works only with its script: off until the page is hydrated. */
  disabled?: boolean;
}) {
  return (
    <button
      type="submit"
      name={name}
      value={value}
      disabled={disabled}
      className={`${buttonClass(tone)} disabled:cursor-not-allowed disabled:opacity-60`}
    >
      {children}
    </button>
  );
}

const tones = {
  primary: "bg-indigo-600 text-white hover:bg-indigo-700",
  secondary: "border border-neutral-300 bg-white text-neutral-800 hover:bg-neutral-50",
  danger: "border border-red-300 bg-white text-red-700 hover:bg-red-50",
};

/** The look of SubmitButton, for plain buttons (type="button") beside it. */
export function buttonClass(tone: keyof typeof tones = "primary") {
  return `inline-flex items-center justify-center rounded-md px-4 py-2 text-sm font-medium focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600 ${tones[tone]}`;
}

/**
 * A form of one button (a table row's "End", "Revoke", "Withdraw"): posts `intent` with the
 * CSRF token and the hidden `fields` that name the row.
 */
export function IntentButton({
  intent,
  fields,
  tone,
  children,
}: {
  intent: string;
  fields: Record<string, string | number>;
  tone?: "primary" | "secondary" | "danger";
  children: React.ReactNode;
}) {
  return (
    <Form method="post">
      <CsrfInput />
      {Object.entries(fields).map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <SubmitButton name="intent" value={intent} tone={tone}>
        {children}
      </SubmitButton>
    </Form>
  );
}
