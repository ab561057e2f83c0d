import { conditionLabels, LOG_CONDITIONS, type LogCondition } from "~/lib/domain/drive-log-terms";
import { CsrfInput } from "./csrf-input";
import { inputClass } from "./form-fields";

// The per-file test details of the upload panel, and the plain form used before JavaScript runs.

/** One file in the upload panel, with its test details and where its upload stands. */
export interface Item {
  key: string;
  file: File;
  condition: LogCondition;
  gear: string;
  damperVariant: string;
  testDate: string;
  notes: string;
  /** "unsendable": the file itself is refused (empty, binary): it is never counted or sent. */
  phase: "ready" | "uploading" | "sent" | "refused" | "unsendable";
  /** Bytes sent so far / total, 0–1. */
  sent: number;
  logId?: number;
  duplicateOf?: number | null;
  message?: string;
}

export const conditionOptions = LOG_CONDITIONS.map((c) => ({
  value: c,
  label: conditionLabels[c],
}));

export const primaryButton =
  "inline-flex items-center justify-center rounded-md bg-indigo-600 px-4 py-2 text-sm font-medium text-white hover:bg-indigo-700 disabled:opacity-50 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-indigo-600";

export type Meta = Pick<Item, "condition" | "gear" | "damperVariant" | "testDate" | "notes">;

/** Test condition, gear, damper variant, test date and driver notes for one file (or all). */
export function MetadataFields({
  idPrefix,
  values,
  onChange,
  plain = false,
}: {
  idPrefix: string;
  values: Meta;
  onChange?: (patch: Partial<Meta>) => void;
  plain?: boolean;
}) {
  // Plain form: uncontrolled with defaults; enhanced: controlled per file.
  const bind = (name: keyof Meta) =>
    plain
      ? { name, defaultValue: values[name] }
      : {
          value: values[name],
          onChange: (
            e: React.ChangeEvent<HTMLInputElement | HTMLSelectElement | HTMLTextAreaElement>,
          ) => onChange?.({ [name]: e.target.value } as Partial<Meta>),
        };
  const id = (n: string) => `${idPrefix}-${n}`;
  const label = "block text-xs font-medium text-neutral-700";
  return (
    <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4">
      <div>
        <label htmlFor={id("condition")} className={label}>
          Test condition
        </label>
        <select id={id("condition")} {...bind("condition")} className={`mt-1 ${inputClass}`}>
          {conditionOptions.map((o) => (
            <option key={o.value} value={o.value}>
              {o.label}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor={id("gear")} className={label}>
          Gear
        </label>
        <input
          id={id("gear")}
          inputMode="numeric"
          aria-describedby={id("gear-hint")}
          {...bind("gear")}
          className={`mt-1 ${inputClass}`}
        />
        <p id={id("gear-hint")} className="mt-1 text-xs text-neutral-500">
          Empty or 0: neutral; −1: reverse.
        </p>
      </div>
      <div>
        <label htmlFor={id("damperVariant")} className={label}>
          Damper variant
        </label>
        <input
          id={id("damperVariant")}
          {...bind("damperVariant")}
          className={`mt-1 ${inputClass}`}
        />
      </div>
      <div>
        <label htmlFor={id("testDate")} className={label}>
          Test date
        </label>
        <input
          id={id("testDate")}
          type="date"
          {...bind("testDate")}
          className={`mt-1 ${inputClass}`}
        />
      </div>
      <div className="sm:col-span-2 lg:col-span-4">
        <label htmlFor={id("notes")} className={label}>
          Driver notes
        </label>
        <textarea id={id("notes")} rows={2} {...bind("notes")} className={`mt-1 ${inputClass}`} />
      </div>
    </div>
  );
}

/** Without JavaScript: one multipart form to the vehicle page's action, one set of details for all files. */
export function PlainUpload({ damperVariant }: { damperVariant: string }) {
  return (
    // The CSRF field comes first so it arrives before the file in the stream.
    <form method="post" encType="multipart/form-data" className="space-y-4">
      <CsrfInput />
      <input type="hidden" name="intent" value="upload" />
      <div>
        <label htmlFor="plain-files" className="block text-sm font-medium text-neutral-800">
          Drive log files (CSV or ASAM MDF4)
        </label>
        <input
          id="plain-files"
          name="file"
          type="file"
          multiple
          required
          accept=".csv,.txt,.tsv,.mf4,.mdf,text/csv,text/plain"
          className="mt-1 block w-full text-sm"
        />
      </div>
      <MetadataFields
        idPrefix="plain"
        values={{ condition: "other", gear: "", damperVariant, testDate: "", notes: "" }}
        plain
      />
      <button type="submit" className={primaryButton}>
        Upload
      </button>
    </form>
  );
}
