import type { AppliedMapping, IngestMapping } from "~/lib/domain/drive-log-terms";
import type { Preview } from "~/lib/domain/column-mapping-schema";
import { Card, tableClass, tdClass, thClass } from "./page";

// What the drive-log page says about a file's columns: the first rows of a CSV whose columns
// could not be read (beside the channel chooser, channels-step.tsx) and which columns the last
// analysis read.

/** The first rows of a CSV file as text, so the columns can be told apart by their values. */
export function FilePreview({ preview }: { preview: Preview }) {
  return (
    <Card title="The file's first rows" id="file-rows">
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
    </Card>
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
  const rest = named < 3 ? "; the rest recognised from the file" : "";
  return parts.length > 1
    ? `${parts.slice(0, -1).join(", ")} and ${parts[parts.length - 1]}${rest}`
    : `${parts[0] ?? ""}${rest}`;
}

/** Which columns the last analysis read, and whether they were recognised or chosen. */
export function columnsUsedText(applied: AppliedMapping): string {
  if (applied.source === "chosen")
    return `The last analysis read the columns chosen for this drive log: ${mappingText(applied.mapping)}.`;
  if (applied.source === "remembered")
    return `The last analysis used this vehicle's remembered column choice: ${mappingText(applied.mapping)}.`;
  const skipped = applied.skipped
    ? ` This vehicle's remembered choice (${mappingText(applied.skipped)}) was left out: this file does not have its columns.`
    : "";
  return `The last analysis recognised the channels by their names in the file.${skipped}`;
}
