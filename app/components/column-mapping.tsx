import type { SubmissionResult } from "@conform-to/react";
import type { AppliedMapping, IngestMapping } from "~/lib/domain/drive-log-terms";
import { mappingSchema, speedUnits, type Preview } from "~/lib/domain/column-mapping-schema";
import { SubmitButton, SchemaForm, useSchemaForm } from "./form";
import { ChoiceField } from "./form-fields";
import { Card, tableClass, tdClass, thClass } from "./page";

export { mappingSchema, type Preview } from "~/lib/domain/column-mapping-schema";

// The column-mapping step of a drive log whose columns could not be read: a preview of the
// file's first rows and a choice of columns and units, remembered for the vehicle's next uploads
// (where they fit the file: app/lib/analyses/column-choice.server.ts).

export function ColumnMapping({
  preview,
  current,
  lastResult,
}: {
  preview: Preview;
  current: Record<string, string>;
  lastResult: SubmissionResult<string[]> | null | undefined;
}) {
  const [form, fields] = useSchemaForm("mapping", mappingSchema, lastResult, current);
  const columnOptions = [
    { value: "", label: "Recognise from the header" },
    ...preview.header.map((h) => ({ value: h, label: h })),
  ];
  const unitOptions = [
    { value: "", label: "From the header" },
    ...speedUnits.map((u) => ({ value: u, label: u })),
  ];
  return (
    <div className="space-y-5">
      <div className="max-h-80 overflow-auto rounded-md border border-neutral-200">
        <table className={`${tableClass} font-mono text-xs`}>
          <caption className="px-3 py-2 text-left font-sans text-sm text-neutral-600">
            The first {preview.rows.length} rows of the file
          </caption>
          <thead>
            <tr>
              {preview.header.map((h, i) => (
                <th key={i} scope="col" className={`${thClass} px-3 whitespace-nowrap`}>
                  {h || `(column ${i + 1})`}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {preview.rows.map((row, r) => (
              <tr key={r}>
                {preview.header.map((_, c) => (
                  <td key={c} className={`${tdClass} px-3 whitespace-nowrap`}>
                    {row[c] ?? ""}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <SchemaForm form={form} intent="map" className="space-y-4">
        <div className="grid gap-4 sm:grid-cols-3">
          <ChoiceField label="Time column" meta={fields.timeColumn} options={columnOptions} />
          <ChoiceField
            label="Crank-side speed column"
            meta={fields.crankColumn}
            options={columnOptions}
          />
          <ChoiceField
            label="Gearbox-input speed column"
            meta={fields.gearboxColumn}
            options={columnOptions}
          />
          <ChoiceField
            label="Time unit"
            meta={fields.timeUnit}
            options={[
              { value: "", label: "From the header" },
              { value: "s", label: "s" },
              { value: "ms", label: "ms" },
            ]}
          />
          <ChoiceField label="Crank speed unit" meta={fields.crankUnit} options={unitOptions} />
          <ChoiceField label="Gearbox speed unit" meta={fields.gearboxUnit} options={unitOptions} />
        </div>
        <p className="text-sm text-neutral-600">
          The choice is remembered for this vehicle: its next uploads use it when their files have
          these columns, and are recognised from the header otherwise.
        </p>
        <SubmitButton>Use these columns and analyse again</SubmitButton>
      </SchemaForm>
    </div>
  );
}

/** "time from “Zeit”, the crank side from “Kanal1” (rpm)" — the channels a mapping sets. */
function mappingText(m: IngestMapping): string {
  const unit = (u: string | undefined) => (u ? ` (${u})` : "");
  const parts = [
    m.timeColumn ? `time from “${m.timeColumn}”${unit(m.timeUnit)}` : null,
    m.crankColumn ? `the crank side from “${m.crankColumn}”${unit(m.crankUnit)}` : null,
    m.gearboxColumn ? `the gearbox side from “${m.gearboxColumn}”${unit(m.gearboxUnit)}` : null,
    !m.timeColumn && m.timeUnit ? `time in ${m.timeUnit}` : null,
    !m.crankColumn && m.crankUnit ? `the crank side in ${m.crankUnit}` : null,
    !m.gearboxColumn && m.gearboxUnit ? `the gearbox side in ${m.gearboxUnit}` : null,
  ].filter((p): p is string => p !== null);
  const named = [m.timeColumn, m.crankColumn, m.gearboxColumn].filter(Boolean).length;
  const rest = named < 3 ? "; the rest from the header" : "";
  return parts.length > 1
    ? `${parts.slice(0, -1).join(", ")} and ${parts[parts.length - 1]}${rest}`
    : `${parts[0] ?? ""}${rest}`;
}

/** Which columns the last analysis read, and whether they came from the header or a choice. */
export function columnsUsedText(applied: AppliedMapping): string {
  if (applied.source === "chosen")
    return `The last analysis read the columns chosen for this drive log: ${mappingText(applied.mapping)}.`;
  if (applied.source === "remembered")
    return `The last analysis used this vehicle's remembered column choice: ${mappingText(applied.mapping)}.`;
  const skipped = applied.skipped
    ? ` This vehicle's remembered choice (${mappingText(applied.skipped)}) was left out: this file does not have its columns.`
    : "";
  return `The last analysis recognised the columns from the header.${skipped}`;
}

/** The form's starting values: the columns the last analysis really used. */
export function mappingDefaults(applied: AppliedMapping | null): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(applied?.mapping ?? {}))
    if (typeof v === "string") out[k] = v;
  return out;
}

/**
 * The drive-log page's columns: the mapping step when it is offered (the file could not be read
 * over its columns and the user may choose), else which columns the last analysis read.
 */
export function ColumnsStep({
  offer,
  preview,
  applied,
  lastResult,
}: {
  offer: boolean;
  preview: Preview | null;
  applied: AppliedMapping | null;
  lastResult: SubmissionResult<string[]> | null | undefined;
}) {
  if (preview && offer)
    return (
      <Card title="Choose the columns" id="mapping">
        {applied ? (
          <p className="mb-4 text-sm text-neutral-700" data-columns-used={applied.source}>
            {columnsUsedText(applied)}
          </p>
        ) : null}
        <ColumnMapping
          preview={preview}
          current={mappingDefaults(applied)}
          lastResult={lastResult}
        />
      </Card>
    );
  return applied ? (
    <p className="text-sm text-neutral-600" data-columns-used={applied.source}>
      {columnsUsedText(applied)}
    </p>
  ) : null;
}
