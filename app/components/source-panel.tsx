/**
 * "Where the numbers came from": the drive log's file as the analysis read it (result.source):
 * its format, the three channels and their units, the file's own metadata, every repair made
 * to the samples, and the sections analysed on their own. Results stored before the source
 * block existed have none, and the panel is not shown.
 */
import type { AnalysisResult } from "~/lib/signal/result-schema";
import { countText } from "~/lib/base/plural";
import { Tile, tableClass, tdClass, thClass } from "./page";

type Source = NonNullable<AnalysisResult["source"]>;

/** More metadata lines than this start folded away. */
const OPEN_METADATA = 6;
const formatLabels: Record<Source["format"], string> = {
  csv: "CSV text",
  mdf4: "ASAM MDF4",
};
const s3 = (x: number) => `${Number(x.toFixed(3))} s`;

function rowsText(rows: { from: number; to: number }[]): string {
  const parts = rows.map((r) => (r.from === r.to ? `${r.from}` : `${r.from}–${r.to}`));
  return parts.length > 8 ? `${parts.slice(0, 8).join(", ")} and more` : parts.join(", ");
}

export function SourcePanel({ source }: { source: Source }) {
  const { channels: ch, units: u } = source;
  const metadata = (
    <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
      {source.metadata.map((m, i) => (
        <div key={i} className="contents">
          <dt className="text-neutral-600">{m.key || "(no key)"}</dt>
          <dd className="break-words">{m.value}</dd>
        </div>
      ))}
    </dl>
  );
  return (
    <Tile title="Where the numbers came from">
      <div className="space-y-4 text-sm" data-source-format={source.format}>
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1">
          <dt className="text-neutral-600">File format</dt>
          <dd>{formatLabels[source.format]}</dd>
          <dt className="text-neutral-600">Time</dt>
          <dd>
            <span className="font-mono">{ch.time}</span> ({u.time})
          </dd>
          <dt className="text-neutral-600">Crank-side speed</dt>
          <dd>
            <span className="font-mono">{ch.crank}</span> ({u.crank})
          </dd>
          <dt className="text-neutral-600">Gearbox-input speed</dt>
          <dd>
            <span className="font-mono">{ch.gearbox}</span> ({u.gearbox})
          </dd>
        </dl>
        <section aria-labelledby="source-metadata">
          <h3 id="source-metadata" className="font-semibold">
            The file's own notes
          </h3>
          {source.metadata.length === 0 ? (
            <p className="text-neutral-600">The file carries no metadata.</p>
          ) : source.metadata.length <= OPEN_METADATA ? (
            metadata
          ) : (
            <details>
              <summary className="cursor-pointer">
                Show all {countText(source.metadata.length, "entry", "entries")}
              </summary>
              <div className="mt-2">{metadata}</div>
            </details>
          )}
        </section>
        <section aria-labelledby="source-repairs">
          <h3 id="source-repairs" className="font-semibold">
            Repairs
          </h3>
          {source.repairs.length === 0 ? (
            <p className="text-neutral-600">None: the samples were analysed as recorded.</p>
          ) : (
            <ul className="space-y-2">
              {source.repairs.map((r, i) => (
                <li key={i} data-repair={r.code}>
                  <p>{r.message}</p>
                  <p className="text-neutral-600">
                    {countText(r.count, "sample")} from {s3(r.fromS)} to {s3(r.toS)}; rows{" "}
                    {rowsText(r.rows)}
                  </p>
                </li>
              ))}
            </ul>
          )}
        </section>
        {source.sections.length > 1 ? (
          <section aria-labelledby="source-sections">
            <h3 id="source-sections" className="font-semibold">
              Analysed in {source.sections.length} sections
            </h3>
            <p className="text-neutral-600">
              Gaps too long to repair split the log; no analysis block spans a gap.
            </p>
            <table className={`${tableClass} mt-1`}>
              <thead>
                <tr>
                  <th className={thClass}>Section</th>
                  <th className={thClass}>From</th>
                  <th className={thClass}>To</th>
                  <th className={thClass}>Samples</th>
                </tr>
              </thead>
              <tbody>
                {source.sections.map((x, i) => (
                  <tr key={i}>
                    <td className={tdClass}>{i + 1}</td>
                    <td className={`${tdClass} tabular-nums`}>{s3(x.startS)}</td>
                    <td className={`${tdClass} tabular-nums`}>{s3(x.endS)}</td>
                    <td className={`${tdClass} tabular-nums`}>{x.samples}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </section>
        ) : (
          <p className="text-neutral-600">
            Analysed as one section
            {source.sections[0]
              ? ` (${s3(source.sections[0].startS)} to ${s3(source.sections[0].endS)}, ${countText(source.sections[0].samples, "sample")})`
              : ""}
            .
          </p>
        )}
      </div>
    </Tile>
  );
}
