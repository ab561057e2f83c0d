import { Link } from "react-router";
import {
  dampingRatioText,
  dbText,
  frequencyText,
  radS2Text,
  rpmText,
  secondsText,
} from "~/lib/domain/format";
import type { AnalysisSummary } from "~/lib/domain/analysis-summary";
import type { TargetVerdict } from "~/lib/domain/targets";
import { warningText } from "~/lib/domain/warning-text";
import { VerdictCaution } from "./caution-note";
import { linkClass } from "./form-fields";
import { Card, Tile } from "./page";
import { TargetVerdictList } from "./target-verdict-list";

// Figures by the rules of ~/lib/format (one per quantity, shared with the charts).
const dB = dbText;
const rpm = rpmText;
const rad = radS2Text;

/**
 * The verdict strip of a drive log: isolation, damper resonance, rattle check and targets, the
 * cautions and the warnings. AnalysisDetails (./analysis-details) has the settings and the
 * isolation table; TargetVerdictList (./target-verdict-list) the verdicts in one line each.
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
  return (
    <div className="space-y-6">
      <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-4">
        <IsolationTile s={s} />
        <ResonanceTile s={s} />
        <RattleTile s={s} rattleHref={rattleHref} />
        <TargetsTile targets={targets} />
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

function IsolationTile({ s }: { s: AnalysisSummary }) {
  return (
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
  );
}

function ResonanceTile({ s }: { s: AnalysisSummary }) {
  return (
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
  );
}

function RattleTile({ s, rattleHref }: { s: AnalysisSummary; rattleHref?: string }) {
  return (
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
  );
}

function TargetsTile({ targets }: { targets?: TargetVerdict[] | null }) {
  const applicable = targets?.filter((t) => t.status !== "not-applicable") ?? [];
  const failed = applicable.filter((t) => t.status === "fail").length;
  const passed = applicable.filter((t) => t.status === "pass").length;
  return (
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
  );
}
