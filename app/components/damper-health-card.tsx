import { Link } from "react-router";
import type { TrendQuantity, VariantTrend, VehicleTrend } from "~/lib/domain/trend";
import {
  dampingRatioText,
  dbNumber,
  dbText,
  fixed,
  frequencyText,
  rpmText,
} from "~/lib/domain/format";
import { VerdictCaution } from "./caution-note";
import { analysedPoints } from "./charts/trend-series";
import { TrendMultiple } from "./charts/trend-multiple";
import { Card, EmptyState, tableClass, tdClass, TableHead, When } from "./page";
import { ScrollArea } from "./scroll-area";

interface Quantity {
  key: TrendQuantity;
  title: string;
  axis: string;
  text: (v: number | null) => string;
}

function quantities(referenceRpm: number): Quantity[] {
  return [
    {
      key: "naturalFrequencyHz",
      title: "Natural frequency",
      axis: "Natural frequency, Hz",
      text: frequencyText,
    },
    {
      key: "dampingRatio",
      title: "Damping ratio",
      axis: "Damping ratio (no unit)",
      text: (v) => `damping ratio ${dampingRatioText(v)}`,
    },
    {
      key: "isolationAtReferenceDb",
      title: `Isolation at ${rpmText(referenceRpm)}`,
      axis: "Isolation, dB",
      text: dbText,
    },
    {
      key: "startStopPeakAmplificationDb",
      title: "Start/stop peak amplification",
      axis: "Amplification, dB",
      text: dbText,
    },
  ];
}

/**
 * "Damper health over time" on the vehicle page: per damper variant, small multiples over test
 * date of the two-mass model's natural frequency and damping ratio, the isolation at the team's
 * reference speed and the start/stop peak amplification; flagged changes in plain sentences; the
 * figures as a table (the charts' text alternative).
 */
export function DamperHealthCard({
  trend,
  vehicleId,
}: {
  trend: VehicleTrend | null;
  vehicleId: number;
}) {
  const enough = analysedPoints(trend) >= 2;
  return (
    <Card title="Damper health over time" id="damper-health">
      {!trend || !enough ? (
        <EmptyState>
          The damper&apos;s trend appears when at least two drive logs of this vehicle are analysed:
          each one is a point at its test date. Upload drive logs of the same test schedule as the
          programme goes on.
        </EmptyState>
      ) : (
        <div className="space-y-8">
          <p className="max-w-3xl text-sm text-neutral-600">
            Each analysed drive log is one point at its test date. A change against the
            variant&apos;s baseline (its first signed-off drive log, else its first analysed one) is
            flagged beyond {fixed(trend.thresholds.naturalFrequencyPct, 0)} % in natural frequency,{" "}
            {fixed(trend.thresholds.dampingRatioPct, 0)} % in damping ratio,{" "}
            {dbText(trend.thresholds.isolationDb)} in isolation at {rpmText(trend.referenceRpm)} and{" "}
            {dbText(trend.thresholds.amplificationDb)} in start/stop amplification. On each chart
            the grey band is that range and the dashed line the baseline.
          </p>
          {trend.variants.map((v) => (
            <Variant key={v.damperVariant} variant={v} trend={trend} vehicleId={vehicleId} />
          ))}
          <VerdictCaution />
        </div>
      )}
    </Card>
  );
}

function Variant({
  variant: v,
  trend,
  vehicleId,
}: {
  variant: VariantTrend;
  trend: VehicleTrend;
  vehicleId: number;
}) {
  const qs = quantities(trend.referenceRpm);
  const headingId = `damper-health-${v.damperVariant.replace(/[^A-Za-z0-9_-]/g, "_")}`;
  const names = new Map(v.points.map((p) => [p.logId, p.fileName]));
  return (
    <section aria-labelledby={headingId} data-variant={v.damperVariant} className="space-y-3">
      <h3 id={headingId} className="text-sm font-semibold text-neutral-900">
        Damper variant {v.damperVariant}
      </h3>
      <p className="text-sm text-neutral-600">
        {v.baseline ? (
          <>
            Baseline: {names.get(v.baseline.logId) ?? "a drive log"} of{" "}
            <When date={v.baseline.date} dateOnly /> (
            {v.baseline.kind === "signed-off" ? "first signed off" : "first analysed"}).
          </>
        ) : (
          "No baseline yet: no drive log of this variant is analysed."
        )}
        {v.points.length < 2 ? " One point only: the trend needs a second drive log." : null}
      </p>
      {v.flags.length ? (
        <ul data-flags className="space-y-1 text-sm text-red-800">
          {v.flags.map((f) => (
            <li key={`${f.quantity}-${f.logId}`} className="flex gap-2">
              <span aria-hidden="true">⚠</span>
              <span>
                {capitalise(f.message.replace(/\.$/, ""))}
                {names.has(f.logId) ? ` (${names.get(f.logId)})` : ""}.
              </span>
            </li>
          ))}
        </ul>
      ) : (
        <p className="text-sm text-neutral-700">No change beyond the thresholds.</p>
      )}
      {v.points.length < 2 ? null : (
        <div className="grid gap-3 sm:grid-cols-2 xl:grid-cols-4">
          {qs.map((q) => (
            <TrendMultiple
              key={q.key}
              variant={v}
              quantity={q.key}
              thresholds={trend.thresholds}
              title={q.title}
              axisLabel={q.axis}
              describe={q.text}
            />
          ))}
        </div>
      )}
      <details className="text-sm" open={v.points.length < 2 || undefined}>
        <summary className="cursor-pointer font-medium text-indigo-700">
          Figures of damper variant {v.damperVariant} as a table
        </summary>
        <div className="mt-2">
          <ScrollArea label={`Damper variant ${v.damperVariant} trend figures`}>
            <table className={tableClass}>
              <caption className="sr-only">
                Damper variant {v.damperVariant}: figures per drive log by test date
              </caption>
              <TableHead
                columns={[
                  "Test date",
                  "Drive log",
                  "Natural frequency, Hz",
                  "Damping ratio",
                  `Isolation at ${rpmText(trend.referenceRpm)}, dB`,
                  "Start/stop peak amplification, dB",
                ]}
              />
              <tbody className="tabular-nums">
                {v.points.map((p) => (
                  <tr key={p.logId}>
                    <td className={tdClass}>
                      <When date={p.date} dateOnly />
                      {p.dateIsUpload ? " (upload)" : ""}
                    </td>
                    <td className={tdClass}>
                      <Link
                        to={`/vehicles/${vehicleId}/logs/${p.logId}`}
                        className="text-indigo-700 underline"
                      >
                        {p.fileName}
                      </Link>
                    </td>
                    {qs.map((q) => (
                      <td key={q.key} className={tdClass}>
                        {cell(q.key, p[q.key], flagged(v, q.key, p.logId))}
                      </td>
                    ))}
                  </tr>
                ))}
              </tbody>
            </table>
          </ScrollArea>
        </div>
      </details>
    </section>
  );
}

function flagged(v: VariantTrend, q: TrendQuantity, logId: number): boolean {
  return v.flags.some((f) => f.quantity === q && f.logId === logId);
}

function cell(q: TrendQuantity, value: number | null, isFlagged: boolean) {
  const text =
    q === "naturalFrequencyHz"
      ? fixed(value, 2)
      : q === "dampingRatio"
        ? dampingRatioText(value)
        : dbNumber(value);
  return isFlagged ? (
    <span className="font-semibold text-red-700">
      {text}
      <span className="sr-only"> (flagged)</span>
      <span aria-hidden="true"> ⚠</span>
    </span>
  ) : (
    text
  );
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}
