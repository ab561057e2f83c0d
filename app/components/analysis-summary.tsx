import { Link } from "react-router";
import {
  dampingRatioText,
  dbNumber,
  dbText,
  frequencyText,
  isolationRangeText,
  percentText,
  radS2Text,
  rpmNumber,
  rpmText,
  sampleRateText,
  secondsText,
} from "~/lib/domain/format";
import type { AnalysisSummary } from "~/lib/domain/analysis-summary";
import { countText } from "~/lib/base/plural";
import type { TargetVerdict } from "~/lib/domain/targets";
import { marginText, TARGET_STATUS_LABELS } from "~/lib/domain/target-text";
import { warningText } from "~/lib/domain/warning-text";
export { summarise, type AnalysisSummary } from "~/lib/domain/analysis-summary";
import { VerdictCaution } from "./caution-note";
import { linkClass } from "./form-fields";
import { Card, tableClass, tdClass, thClass } from "./page";

// Figures by the rules of ~/lib/format (one per quantity, shared with the charts).
const dB = dbText;
const rpm = rpmText;
const rad = radS2Text;

const statusClass: Record<TargetVerdict["status"], string> = {
  pass: "text-green-700",
  fail: "text-red-700",
  "not-covered": "text-neutral-500",
  "not-applicable": "text-neutral-500",
};

/**
 * The verdict strip of a drive log: isolation, damper resonance, rattle check and targets, the
 * cautions and the warnings. AnalysisDetails has the settings and the isolation table.
 */
export function AnalysisSummaryView({
  s,
  targets,
  rattleHref,
}: {
  s: AnalysisSummary;
  /** Null when the caller does not show targets (e.g. a share link without them). */
  targets?: TargetVerdict[] | null;
  rattleHref?: string;
}) {
  const applicable = targets?.filter((t) => t.status !== "not-applicable") ?? [];
  const failed = applicable.filter((t) => t.status === "fail").length;
  const passed = applicable.filter((t) => t.status === "pass").length;
  return (
    <div className="space-y-6">
      <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-4">
        <Tile title="Isolation at the firing order">
          <p className="text-sm text-neutral-600">
            Order {s.firingOrder}
            {s.rpmRange
              ? s.rpmRange[0] === s.rpmRange[1]
                ? `, at ${rpm(s.rpmRange[0])} only`
                : `, ${rpm(s.rpmRange[0])} to ${rpm(s.rpmRange[1])}`
              : ""}
          </p>
          {s.minimum ? (
            <p className="mt-2">
              <span className="text-2xl font-semibold text-indigo-700">{dB(s.minimum.dB)}</span>{" "}
              <span className="text-sm text-neutral-600">least, at {rpm(s.minimum.rpm)}</span>
            </p>
          ) : (
            <p className="mt-2 text-sm">No engine-speed bins with enough blocks.</p>
          )}
          <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 text-sm">
            {s.at.map((a) => (
              <div key={a.label} className="contents">
                <dt className="text-neutral-600">
                  {a.label}
                  {a.label === "At idle" ? ` (${rpm(a.rpm)})` : ""}
                </dt>
                <dd>
                  {a.dB === null ? <span className="text-neutral-500">not covered</span> : dB(a.dB)}
                </dd>
              </div>
            ))}
          </dl>
        </Tile>
        <Tile title="Damper resonance">
          {s.resonance ? (
            <>
              <p className="text-2xl font-semibold">{rpm(s.resonance.rpm)}</p>
              <p className="text-sm text-neutral-600">
                least isolation {dB(s.resonance.dB)}
                {s.resonance.dB < 0 ? " (amplification)" : ""}
              </p>
            </>
          ) : (
            <p className="text-sm">Not in this log&apos;s speed range.</p>
          )}
          <p className="mt-3 text-sm text-neutral-600">
            Two-mass model fit:{" "}
            {s.model
              ? `natural frequency ${frequencyText(s.model.naturalFrequencyHz)} (${rpm(s.model.resonanceRpm)} at the firing order), damping ratio ${dampingRatioText(s.model.dampingRatio)}`
              : s.warnings.some((w) => w.code === "no_model_fit")
                ? "not fitted; the warnings below say why"
                : "not fitted"}
          </p>
        </Tile>
        <Tile title="Rattle check">
          {s.rattle ? (
            <>
              <p
                className={`text-2xl font-semibold ${s.rattle.verdict === "ok" ? "text-green-700" : "text-red-700"}`}
              >
                {s.rattle.verdict === "ok" ? "Below the limit" : "Over the limit"}
              </p>
              <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 text-sm">
                <dt className="text-neutral-600">At the firing order</dt>
                <dd>{rad(s.rattle.gearboxAngAccelRadS2)}</dd>
                <dt className="text-neutral-600">Peak</dt>
                <dd>{rad(s.rattle.gearboxAngAccelPeakRadS2)}</dd>
                <dt className="text-neutral-600">Limit</dt>
                <dd>{rad(s.rattle.limitRadS2)}</dd>
                <dt className="text-neutral-600">Idle</dt>
                <dd>
                  {rpm(s.rattle.meanRpm)}, {secondsText(s.rattle.idleDurationS)}
                </dd>
              </dl>
              {rattleHref ? (
                <Link to={rattleHref} className={`${linkClass} mt-2 inline-block text-sm`}>
                  Open the rattle check
                </Link>
              ) : null}
            </>
          ) : (
            <p className="text-sm">No idle segment in this log, so no rattle check.</p>
          )}
        </Tile>
        <Tile title="Targets">
          {targets === undefined || targets === null ? (
            <p className="text-sm text-neutral-600">Targets are not shown here.</p>
          ) : targets.length === 0 ? (
            <p className="text-sm text-neutral-600">
              This vehicle has no targets yet. Engineers set them on the vehicle page.
            </p>
          ) : (
            <>
              <p
                className={`text-2xl font-semibold ${failed ? "text-red-700" : passed ? "text-green-700" : "text-neutral-700"}`}
              >
                {applicable.length === 0
                  ? "None apply"
                  : failed
                    ? `${failed} of ${applicable.length} failed`
                    : `${passed} of ${applicable.length} passed`}
              </p>
              <TargetVerdictList verdicts={targets} className="mt-2" />
            </>
          )}
        </Tile>
      </div>
      <VerdictCaution />
      {s.warnings.length ? (
        <Card title="Warnings" id="warnings">
          <ul className="list-disc space-y-1 pl-5 text-sm">
            {s.warnings.map((w, i) => (
              <li key={i}>{warningText(w)}</li>
            ))}
          </ul>
        </Card>
      ) : null}
    </div>
  );
}

/** The settings and the isolation curve as a table: below the charts, for tracing every figure. */
export function AnalysisDetails({ s }: { s: AnalysisSummary }) {
  // The same range, by the same rule, as the isolation curve's text alternative.
  const range = isolationRangeText(
    s.curve.map((p) => p.dB),
    s.curve.map((p) => p.aboveNoise),
  );
  return (
    <div className="space-y-6">
      <Tile title="Analysis settings">
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 text-sm sm:grid-cols-[auto_1fr_auto_1fr_auto_1fr]">
          <dt className="text-neutral-600">Samples per rev</dt>
          <dd>
            {s.settings.samplesPerRevMin === s.settings.samplesPerRev
              ? s.settings.samplesPerRev
              : `${s.settings.samplesPerRevMin}–${s.settings.samplesPerRev}`}
          </dd>
          <dt className="text-neutral-600">Revs per block</dt>
          <dd>
            {s.settings.revsPerBlock} (order resolution {(1 / s.settings.revsPerBlock).toFixed(3)})
          </dd>
          <dt className="text-neutral-600">Block overlap</dt>
          <dd>{percentText(s.settings.overlap)}</dd>
          <dt className="text-neutral-600">Bin width</dt>
          <dd>{s.settings.binRpm} rpm</dd>
          <dt className="text-neutral-600">Recording</dt>
          <dd>
            {secondsText(s.durationS)} at {sampleRateText(s.sampleRateHz)}
          </dd>
        </dl>
      </Tile>
      <details
        id="isolation"
        className="rounded-lg border border-neutral-200 bg-white p-5 shadow-xs"
      >
        <summary className="cursor-pointer text-sm font-semibold">
          Isolation curve at the firing order as a table (
          {countText(s.curve.length, "engine speed")}
          {range ? `, ${range}` : ""})
        </summary>
        <div className="mt-3">
          {s.curve.length === 0 ? (
            <p className="text-sm text-neutral-600">No engine-speed bins.</p>
          ) : (
            <div className="max-h-96 overflow-auto">
              <table className={tableClass}>
                <caption className="sr-only">Isolation in dB against engine speed</caption>
                <thead className="sticky top-0 bg-white">
                  <tr>
                    <th className={thClass}>Engine speed (rpm)</th>
                    <th className={thClass}>Isolation (dB)</th>
                    <th className={thClass}>Blocks</th>
                    <th className={thClass}>Above noise</th>
                  </tr>
                </thead>
                <tbody>
                  {s.curve.map((p) => (
                    <tr key={p.rpm}>
                      <td className={tdClass}>{rpmNumber(p.rpm)}</td>
                      <td className={`${tdClass} tabular-nums`}>{dbNumber(p.dB)}</td>
                      <td className={tdClass}>{p.blocks}</td>
                      <td className={tdClass}>{p.aboveNoise ? "yes" : "no"}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
        </div>
      </details>
    </div>
  );
}

/** Each target's verdict with its margin and the reason in one line (drive-log and rattle pages). */
export function TargetVerdictList({
  verdicts,
  className = "",
}: {
  verdicts: TargetVerdict[];
  className?: string;
}) {
  return (
    <ul className={`space-y-1.5 text-sm ${className}`} data-testid="target-verdicts">
      {verdicts.map((t) => (
        <li key={t.targetId} data-status={t.status}>
          <span className={`font-semibold ${statusClass[t.status]}`}>
            {TARGET_STATUS_LABELS[t.status]}
          </span>{" "}
          {t.name}
          {t.margin !== null ? (
            <span className="text-neutral-600"> — margin {marginText(t)}</span>
          ) : null}
          <span className="block text-xs text-neutral-500">{t.detail}</span>
        </li>
      ))}
    </ul>
  );
}

function Tile({ title, children }: { title: string; children: React.ReactNode }) {
  return (
    <section className="rounded-lg border border-neutral-200 bg-white p-5 shadow-xs">
      <h3 className="text-sm font-semibold text-neutral-500">{title}</h3>
      <div className="mt-2">{children}</div>
    </section>
  );
}
