import { Link } from "react-router";
import type { Comparison } from "~/lib/domain/comparison";
import { REFERENCE_RULE } from "~/lib/domain/comparison-order";
import type { ComparedLog } from "~/lib/data/comparison.server";
import { conditionLabels } from "~/lib/domain/drive-log-terms";
import { dbChangeNumber, dbNumber } from "~/lib/domain/format";
import { CurveOverlay, overlayStyle } from "./charts";
import { VerdictCaution } from "./caution-note";
import { linkClass } from "./form-fields";
import { Card, EmptyState, tableClass, tdClass, thClass } from "./page";
import { ScrollArea } from "./scroll-area";

/**
 * The comparison of two or more drive logs (the signed-in page and a share link): the verdict,
 * the reference and why, the drive logs with their key, the overlaid curves and the band table.
 * `logs` come reference first (comparisonLogs). Links are passed in, so a share link can leave
 * them out.
 */
export function ComparisonView({
  vehicle,
  logs,
  referenceNote,
  comparison,
  curvesUrl,
  logHref,
}: {
  vehicle: { name: string; identifier: string };
  logs: ComparedLog[];
  referenceNote: string | null;
  comparison: Comparison;
  curvesUrl: string;
  logHref?: (id: number) => string;
}) {
  const analysed = logs.filter((l) => l.analysed);
  const missing = logs.filter((l) => !l.analysed);
  const ref = analysed[0];
  const exportContext = { vehicle: `${vehicle.name} (${vehicle.identifier})` };
  return (
    <>
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">
          Comparison on {vehicle.name}{" "}
          <span className="font-normal text-neutral-500">({vehicle.identifier})</span>
        </h1>
        <div className="mt-3 space-y-1" data-testid="comparison-verdict">
          {comparison.verdicts.length ? (
            comparison.verdicts.map((v) => (
              <p key={v} className="text-lg text-neutral-900">
                {v}
              </p>
            ))
          ) : (
            <p className="text-neutral-600">
              At least two analysed drive logs are needed for a verdict.
            </p>
          )}
          {referenceNote ? (
            <p className="text-sm text-neutral-700" data-testid="comparison-reference">
              {referenceNote}
            </p>
          ) : null}
          <p className="text-sm text-neutral-500">
            {REFERENCE_RULE} Isolation at the firing order, mean over each {comparison.bandRpm} rpm
            band; differences under {comparison.sameWithinDb} dB count as the same.
          </p>
        </div>
      </header>

      {missing.length ? (
        <p role="status" className="rounded-md border border-amber-500 px-4 py-2 text-sm">
          Left out, no finished analysis yet:{" "}
          {missing.map((l) => `${l.fileName} (${l.status})`).join(", ")}.
        </p>
      ) : null}

      <ol aria-label="Drive logs compared" className="flex flex-wrap gap-3">
        {logs.map((l, i) => (
          <li
            key={l.id}
            className="flex items-center gap-3 rounded-lg border border-neutral-200 bg-white px-3 py-2 text-sm"
          >
            <span
              aria-hidden
              className="inline-flex size-6 items-center justify-center rounded-full bg-neutral-900 text-xs font-semibold text-white"
            >
              {i + 1}
            </span>
            {l.analysed ? <LineKey index={analysed.indexOf(l)} /> : null}
            <span>
              <span className="font-medium">{capitalise(l.name)}</span>
              {l === ref ? <span className="ml-1 text-neutral-500">(reference)</span> : null}
              <span className="block text-neutral-600">
                {conditionLabels[l.condition]}
                {l.gear && l.gear > 0 ? `, gear ${l.gear}` : ""} · damper {l.damperVariant}
                {l.testDate ? ` · ${l.testDate}` : ""}
              </span>
            </span>
            {logHref ? (
              <Link to={logHref(l.id)} className={linkClass}>
                Open<span className="sr-only"> {l.fileName}</span>
              </Link>
            ) : null}
          </li>
        ))}
      </ol>

      <div className="grid gap-6 lg:grid-cols-2">
        <CurveOverlay curvesUrl={curvesUrl} kind="isolation" exportContext={exportContext} />
        <CurveOverlay curvesUrl={curvesUrl} kind="order" exportContext={exportContext} />
      </div>

      <Card title={`Isolation change per ${comparison.bandRpm} rpm band`} id="bands">
        {comparison.rows.length === 0 ? (
          <EmptyState>No isolation curves to compare yet.</EmptyState>
        ) : (
          <ScrollArea label="Isolation change per band">
            <table className={tableClass} data-testid="band-table">
              <caption className="sr-only">
                Mean isolation at the firing order per engine-speed band, dB, for each drive log,
                and the change against the reference ({ref?.name ?? "the first drive log"}).
              </caption>
              <thead>
                <tr>
                  <th scope="col" className={thClass}>
                    Engine speed, rpm
                  </th>
                  {analysed.map((l, i) => (
                    <th key={l.id} scope="col" className={`${thClass} text-right`}>
                      {i + 1}. {capitalise(l.name)}, dB
                    </th>
                  ))}
                  {analysed.slice(1).map((l, i) => (
                    <th key={l.id} scope="col" className={`${thClass} text-right`}>
                      Change {i + 2} − 1, dB
                    </th>
                  ))}
                  <th scope="col" className={thClass}>
                    Better
                  </th>
                </tr>
              </thead>
              <tbody>
                {comparison.rows.map((row) => (
                  <tr key={row.fromRpm} data-from-rpm={row.fromRpm}>
                    <th scope="row" className={`${tdClass} font-normal tabular-nums`}>
                      {row.fromRpm}–{row.toRpm}
                    </th>
                    {row.dB.map((v, i) => (
                      <td
                        key={i}
                        className={`${tdClass} text-right tabular-nums ${row.best === i ? "font-semibold text-green-700" : ""}`}
                      >
                        {dbNumber(v)}
                      </td>
                    ))}
                    {row.changeDb.slice(1).map((v, i) => (
                      <td key={i} className={`${tdClass} text-right tabular-nums`}>
                        {dbChangeNumber(v)}
                      </td>
                    ))}
                    <td className={tdClass}>
                      {row.best === null
                        ? row.changeDb.some((v) => v !== null)
                          ? "about the same"
                          : "—"
                        : `${row.best + 1}. ${capitalise(analysed[row.best]!.name)}`}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </ScrollArea>
        )}
      </Card>
      <VerdictCaution />
    </>
  );
}

/** The drive log's line in the overlays: the same colour and dash pattern, with its name for screen readers. */
function LineKey({ index }: { index: number }) {
  const style = overlayStyle(index);
  return (
    <svg width="32" height="10" role="img" aria-label={`drawn ${style.name}`} className="shrink-0">
      <line
        x1="1"
        x2="31"
        y1="5"
        y2="5"
        stroke={style.colour}
        strokeWidth="2.5"
        strokeDasharray={style.dash.join(" ") || undefined}
      />
    </svg>
  );
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
