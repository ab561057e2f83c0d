import { Link, useLoaderData } from "react-router";
import { TargetVerdictList } from "~/components/target-verdict-list";
import { VerdictCaution } from "~/components/caution-note";
import { RattleCharts } from "~/components/charts";
import { Breadcrumb } from "~/components/breadcrumb";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { linkClass } from "~/components/form-fields";
import { Card, EmptyState, tableClass, tdClass, thClass } from "~/components/page";
import { conditionLabels, RATTLE_LIMIT_SOURCE } from "~/lib/domain/drive-log-terms";
import { radS2Number, radS2Text, rpmText, secondsNumber, secondsText } from "~/lib/domain/format";
import { idParam } from "~/lib/http/params";
import { rattleReading } from "~/lib/domain/rattle-reading";
import { targetData } from "~/lib/data/targets.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import type { Route } from "./+types/rattle";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";

export const meta = ({ data }: Route.MetaArgs) => [
  { title: `Rattle check · ${data?.log.fileName ?? "Drive log"} · Twistlog` },
];

/** /vehicles/:vehicleId/logs/:logId/rattle: the idle gear-rattle assessment of one drive log. */
export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team } = await requireAccess(request, "viewer");
  const data = vehicleData(team.id);
  const { vehicle, log } = await data.vehicleLog(idParam(params.vehicleId), idParam(params.logId));
  const analysis = await data.latestAnalysis(log.id);
  const idle = analysis?.result.idle ?? null;
  // The vehicle's rattle targets, judged on this analysis (isolation targets are on the drive-log page).
  const targets = analysis
    ? (await targetData(team.id).verdictsForAnalysis(vehicle.id, log, analysis.result)).filter(
        (v) => v.kind === "rattle",
      )
    : [];
  return {
    targets,
    vehicle: { id: vehicle.id, name: vehicle.name, identifier: vehicle.identifier },
    log: {
      id: log.id,
      fileName: log.fileName,
      condition: log.condition,
      testDate: log.testDate,
      status: log.status,
    },
    analysis: analysis
      ? { version: analysis.version, firingOrder: analysis.result.firingOrder }
      : null,
    idle: idle ? { ...idle, accelTrace: null } : null,
    reading: idle ? rattleReading(idle) : null,
  };
});

export default function RattlePage() {
  const { vehicle, log, analysis, idle, reading, targets } = useLoaderData<typeof loader>();
  const logHref = `/vehicles/${vehicle.id}/logs/${log.id}`;
  return (
    <div className="space-y-6">
      <Breadcrumb
        trail={[
          { label: "Vehicles", to: "/vehicles" },
          { label: vehicle.identifier, to: `/vehicles/${vehicle.id}` },
          {
            label: `${conditionLabels[log.condition]}${log.testDate ? `, ${log.testDate}` : ""}`,
            to: logHref,
          },
          { label: "Rattle check" },
        ]}
      />
      <header>
        <h1 className="text-2xl font-semibold tracking-tight">Rattle check</h1>
        <p className="mt-1 text-sm text-neutral-600 break-all">
          {log.fileName} · {vehicle.name}
          {analysis
            ? ` · analysis version ${analysis.version}, firing order ${analysis.firingOrder}`
            : ""}
        </p>
      </header>

      {!analysis ? (
        <EmptyState>
          This drive log has no finished analysis yet ({log.status}).{" "}
          <Link to={logHref} className={linkClass}>
            Back to the drive log
          </Link>
          .
        </EmptyState>
      ) : !idle || !reading ? (
        <EmptyState>
          This drive log has no idle segment, so there is nothing to check for idle gear rattle.
          Record at least 10 s of steady idle (neutral or in gear) for a rattle check.
        </EmptyState>
      ) : (
        <>
          <section
            aria-labelledby="reading-title"
            className={`rounded-lg border-2 p-5 ${reading.verdict === "ok" ? "border-green-600" : "border-red-600"} bg-white`}
          >
            <h2 id="reading-title" className="text-lg font-semibold">
              <span className={reading.verdict === "ok" ? "text-green-700" : "text-red-700"}>
                {reading.verdict === "ok" ? "Within the limit" : "Over the limit"}
              </span>
              <span className="ml-2 font-normal text-neutral-800">{reading.headline}</span>
            </h2>
            <div className="mt-2 space-y-1 text-sm text-neutral-800">
              {reading.sentences.map((s) => (
                <p key={s}>{s}</p>
              ))}
            </div>
            <dl className="mt-4 grid gap-4 text-sm sm:grid-cols-4">
              <Figure
                term="Firing-order angular acceleration"
                value={radS2Text(idle.gearboxAngAccelRadS2)}
              />
              <Figure
                term="Highest momentary value"
                value={radS2Text(idle.gearboxAngAccelPeakRadS2)}
              />
              <Figure term="Limit" value={radS2Text(idle.limitRadS2)} />
              <Figure
                term="Idle examined"
                value={`${secondsText(idle.idleDurationS)} at ${rpmText(idle.meanRpm)}`}
              />
            </dl>
            <p className="mt-3 text-xs text-neutral-500">
              Angular acceleration α = Δω·q·Ω from the gearbox-input firing-order amplitude Δω, the
              firing order q and the mean engine speed Ω; the momentary value is the peak of the
              filtered, differentiated gearbox-input speed. Limit: the vehicle&apos;s rattle limit
              (default source: {RATTLE_LIMIT_SOURCE})
            </p>
          </section>
          {targets.length ? (
            <Card title="Rattle targets" id="rattle-targets">
              <TargetVerdictList verdicts={targets} />
            </Card>
          ) : null}
          <VerdictCaution />
          <RattleCharts
            chartsUrl={`${logHref}/charts.json`}
            analysisVersion={analysis.version}
            exportContext={{
              vehicle: `${vehicle.name} (${vehicle.identifier})`,
              driveLog: log.fileName,
            }}
          />
          <Card title="Spans above the limit" id="spans">
            {idle.spans.length === 0 ? (
              <EmptyState>The angular acceleration never rises above the limit.</EmptyState>
            ) : (
              <table className={tableClass} data-testid="rattle-spans">
                <caption className="sr-only">
                  Stretches of idle where the gearbox-input angular acceleration exceeds the limit
                </caption>
                <thead>
                  <tr>
                    <th scope="col" className={thClass}>
                      From, s
                    </th>
                    <th scope="col" className={thClass}>
                      To, s
                    </th>
                    <th scope="col" className={thClass}>
                      Duration, s
                    </th>
                    <th scope="col" className={thClass}>
                      Peak, rad/s²
                    </th>
                  </tr>
                </thead>
                <tbody>
                  {idle.spans.map((s) => (
                    <tr key={s.startS}>
                      <td className={`${tdClass} tabular-nums`}>{secondsNumber(s.startS)}</td>
                      <td className={`${tdClass} tabular-nums`}>{secondsNumber(s.endS)}</td>
                      <td className={`${tdClass} tabular-nums`}>{secondsNumber(s.durationS)}</td>
                      <td className={`${tdClass} tabular-nums`}>{radS2Number(s.peakRadS2)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </Card>
        </>
      )}
    </div>
  );
}

function Figure({ term, value }: { term: string; value: string }) {
  return (
    <div>
      <dt className="text-neutral-500">{term}</dt>
      <dd className="mt-0.5 text-base font-semibold tabular-nums">{value}</dd>
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
