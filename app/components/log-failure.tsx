import type { LogError } from "~/lib/domain/drive-log-terms";
import { canChooseColumnsFor, MAPPING_CODES } from "~/lib/domain/column-reasons";

export { MAPPING_CODES };
/** The drive-log page offers the channel chooser for this failure (domain/column-reasons.ts). */
export const canChooseColumns = canChooseColumnsFor;

/** "Row 4, column 'crank speed [rpm]': …" — the signal core's message with where it happened. */
export function errorText(e: LogError): string {
  // The core's message may name the place itself ("row 4, column …: …"); say it once, in front.
  const message = e.message.replace(/^row \d+(, column "[^"]*")?:\s*/i, "");
  const where = [e.row ? `Row ${e.row}` : null, e.column ? `column '${e.column}'` : null]
    .filter(Boolean)
    .join(", ");
  return where ? `${where}: ${message}` : message.charAt(0).toUpperCase() + message.slice(1);
}

export function Failure({ error }: { error: LogError }) {
  const header = MAPPING_CODES.has(error.code);
  return (
    <section
      aria-labelledby="failure-title"
      className="rounded-lg border border-red-200 bg-red-50 p-5"
    >
      <h2 id="failure-title" className="font-semibold text-red-900">
        This drive log could not be analysed
      </h2>
      <p className="mt-2 text-sm text-red-900" data-error-code={error.code}>
        {errorText(error)}
      </p>
      <p className="mt-2 text-sm text-red-800">
        {header
          ? "Pick the channels in the channel chooser below and it is analysed again; the raw file is kept."
          : canChooseColumns(error)
            ? "The raw file is kept. If a channel or its unit was read wrongly, pick them in the channel chooser below; otherwise fix the file and upload it again."
            : "The raw file is kept: fix the file and upload it again, or ask an engineer to re-analyse it with other settings."}
      </p>
    </section>
  );
}
