import { parseWithZod } from "@conform-to/zod/v4";
import { data, useActionData, useLoaderData } from "react-router";
import { AnalysisDetails } from "~/components/analysis-details";
import { AnalysisSummaryView } from "~/components/analysis-summary";
import { AnalysisVersions, EarlierVersionNote } from "~/components/analysis-versions";
import {
  ColumnMapping,
  columnsUsedText,
  mappingDefaults,
  mappingSchema,
} from "~/components/column-mapping";
import { DriveLogCharts } from "~/components/charts";
import { canChooseColumns, Failure } from "~/components/log-failure";
import { Breadcrumb } from "~/components/breadcrumb";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { linkClass } from "~/components/form-fields";
import { isActive, LogStatus } from "~/components/log-status";
import { useLiveStatus } from "~/components/use-log-progress";
import { Card, Notice, When } from "~/components/page";
import { ReanalyseForm, reanalyseSchema } from "~/components/reanalyse-form";
import { SharePanel } from "~/components/share-panel";
import { CommentsPanel, useCommentMarkers } from "~/components/comments-panel";
import { summarise } from "~/lib/domain/analysis-summary";
import { analysisParam } from "~/lib/http/analysis-param";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { logLabel } from "~/lib/data/curves.server";
import { conditionLabels, gearLabel, type IngestMapping } from "~/lib/domain/drive-log-terms";
import { idParam } from "~/lib/http/params";
import { invariantResponse, requireTeamRole } from "~/lib/http/permissions.server";
import { atLeast } from "~/lib/domain/roles";
import { teamData } from "~/lib/data/team-data.server";
import { outOfScope } from "~/lib/domain/targets";
import { targetData, toTarget } from "~/lib/data/targets.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { readPreview } from "../lib/data/drive-log-preview.server";
import type { Route } from "./+types/drive-log";

export const meta = ({ data }: Route.MetaArgs) => [
  { title: `${data?.log.fileName ?? "Drive log"} · Twistlog` },
];

async function load(
  request: Request,
  params: Route.LoaderArgs["params"],
  role: "viewer" | "technician" | "engineer",
) {
  const current = await requireTeamRole(request, role);
  const vehicles = vehicleData(current.team.id);
  const { vehicle, log } = await vehicles.vehicleLog(
    idParam(params.vehicleId),
    idParam(params.logId),
  );
  return { ...current, vehicles, vehicle, log };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { team, vehicles, vehicle, log } = await load(request, params, "viewer");
  const versions = await vehicles.versions(log.id);
  // ?analysis=<id> shows an earlier version, read only; without it the latest, as always.
  const wanted = analysisParam(request);
  const chosen = wanted === undefined ? null : versions.find((v) => v.id === wanted);
  invariantResponse(chosen !== undefined, "No such analysis version of this drive log.", {
    status: 404,
  });
  const analysis =
    chosen && chosen.id !== log.latestAnalysisId
      ? await vehicles.analysisOf(log.id, chosen.id)
      : await vehicles.latestAnalysis(log.id);
  const result = analysis?.result ?? null;
  const targets = targetData(team.id);
  const verdicts = result ? await targets.verdictsForAnalysis(vehicle.id, log, result) : null;
  // Isolation targets that apply to this drive log, drawn as bands on its isolation curve.
  const bands = (await targets.list(vehicle.id)).flatMap((t) =>
    t.kind === "isolation" &&
    t.rpmFrom !== null &&
    t.rpmTo !== null &&
    t.minDb !== null &&
    !outOfScope(toTarget(t), log)
      ? [{ id: t.id, name: t.name, rpmFrom: t.rpmFrom, rpmTo: t.rpmTo, minDb: t.minDb }]
      : [],
  );
  const members = await teamData(team.id).members();
  // Other analysed drive logs of this vehicle to compare with, the same condition first.
  const others = (await vehicles.logs(vehicle.id))
    .filter((l) => l.id !== log.id && l.latestAnalysisId)
    .sort((a, b) => Number(b.condition === log.condition) - Number(a.condition === log.condition))
    .slice(0, 12)
    .map((l) => ({ id: l.id, label: logLabel(l), fileName: l.fileName }));
  const error = log.status === "failed" ? log.error : null;
  const mapping = error && canChooseColumns(error) ? await readPreview(log.blobKey) : null;
  const applied = await vehicles.appliedColumns(log.id);
  return {
    role: team.role,
    vehicle: {
      id: vehicle.id,
      name: vehicle.name,
      identifier: vehicle.identifier,
    },
    log: {
      id: log.id,
      fileName: log.fileName,
      sizeBytes: log.sizeBytes,
      condition: log.condition,
      gear: log.gear,
      damperVariant: log.damperVariant,
      testDate: log.testDate,
      notes: log.notes,
      uploadedAt: log.uploadedAt,
      uploadedBy:
        members.find((m) => m.userId === log.uploadedBy)?.name ??
        (log.uploadedBy ? "a former member" : "a script"),
      status: log.status,
      progress: log.progress,
      stage: log.stage,
      error,
    },
    summary: result ? summarise(result, vehicle.idleRpm) : null,
    verdicts,
    bands,
    current: result
      ? {
          firingOrder: result.firingOrder,
          revsPerBlock: result.settings.revsPerBlock,
          binRpm: result.settings.binRpm,
        }
      : null,
    versions,
    shownId: analysis?.id,
    others,
    preview: mapping,
    applied,
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const intent = form.get("intent");
  if (intent === "map") {
    // Fixing the columns of an upload is the technician's own job (docs/architecture.md §2).
    const { vehicles, vehicle, log } = await load(request, params, "technician");
    // Only the page's offer may be taken: a log that failed over its columns. Otherwise a post
    // would overwrite the vehicle's remembered columns from a log that read fine.
    invariantResponse(
      log.status === "failed" && log.error && canChooseColumns(log.error),
      "The columns can be chosen only for a drive log that could not be read because of its columns; this one is not in that state, so nothing was changed.",
      { status: 409 },
    );
    const submission = parseWithZod(form, { schema: mappingSchema });
    if (submission.status !== "success") return data({ map: submission.reply() }, { status: 400 });
    const { intent: _, ...mapping } = submission.value;
    const { header } = await readPreview(log.blobKey, 0);
    const fieldErrors: Record<string, string[]> = {};
    const chosen = new Map<string, string>();
    for (const key of ["timeColumn", "crankColumn", "gearboxColumn"] as const) {
      const name = mapping[key];
      if (name === undefined) continue;
      if (!header.includes(name)) fieldErrors[key] = [`The file has no column “${name}”.`];
      else if (chosen.has(name))
        fieldErrors[key] = [`“${name}” is already the ${chosen.get(name)}.`];
      else chosen.set(name, key.replace("Column", " column"));
    }
    if (Object.keys(fieldErrors).length)
      return data({ map: submission.reply({ fieldErrors }) }, { status: 400 });
    const clean = Object.fromEntries(
      Object.entries(mapping).filter(([, v]) => v !== undefined),
    ) as IngestMapping;
    await vehicles.rememberMapping(vehicle.id, clean);
    await vehicles.reanalyse(log.id, {}, clean);
    return {
      notice:
        "The columns are set and remembered for this vehicle; the drive log is being analysed again.",
    };
  }
  invariantResponse(intent === "reanalyse", "Unknown action.", { status: 400 });
  const { vehicles, log } = await load(request, params, "engineer");
  const submission = parseWithZod(form, { schema: reanalyseSchema });
  if (submission.status !== "success")
    return data({ reanalyse: submission.reply() }, { status: 400 });
  const { intent: _, ...overrides } = submission.value;
  await vehicles.reanalyse(log.id, overrides);
  return { notice: "A new analysis version is queued; the earlier ones are kept." };
}

export default function DriveLogPage() {
  const {
    role,
    vehicle,
    log,
    summary,
    verdicts,
    bands,
    current,
    versions,
    shownId,
    others,
    preview,
    applied,
  } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const progress = useLiveStatus(log);
  const markers = useCommentMarkers(vehicle.id, `log:${log.id}`);
  const notice = result && "notice" in result ? result.notice : null;
  const latest = versions[0];
  const logHref = `/vehicles/${vehicle.id}/logs/${log.id}`;
  const shown = versions.find((v) => v.id === shownId) ?? latest;
  // An earlier version is for reading: no downloads of the latest, no sharing, no re-analysis.
  const earlier = shown && latest && shown.id !== latest.id ? shown : null;
  return (
    <div className="space-y-6">
      <Breadcrumb
        trail={[
          { label: "Vehicles", to: "/vehicles" },
          { label: vehicle.identifier, to: `/vehicles/${vehicle.id}` },
          { label: `${conditionLabels[log.condition]}${log.testDate ? `, ${log.testDate}` : ""}` },
        ]}
      />
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div className="min-w-0">
          <h1 className="text-2xl font-semibold tracking-tight break-all">{log.fileName}</h1>
          <dl className="mt-3 flex flex-wrap gap-x-6 gap-y-1 text-sm">
            <Meta term="Vehicle">{vehicle.name}</Meta>
            <Meta term="Condition">{conditionLabels[log.condition]}</Meta>
            <Meta term="Gear">{gearLabel(log.gear)}</Meta>
            <Meta term="Damper variant">{log.damperVariant}</Meta>
            <Meta term="Test date">
              {log.testDate ? <When date={log.testDate} dateOnly /> : "—"}
            </Meta>
            <Meta term="Uploaded">
              <When date={log.uploadedAt} /> by {log.uploadedBy}
            </Meta>
          </dl>
          <div className="mt-3 flex flex-wrap items-center gap-x-4 gap-y-2 text-sm">
            <LogStatus log={progress.log} label={log.fileName} />
            <a href={`/vehicles/${vehicle.id}/logs/${log.id}/file`} className={linkClass} download>
              Download the raw file
            </a>
            {summary && !earlier ? (
              <>
                <a
                  href={`/api/v1/logs/${log.id}/result`}
                  className={linkClass}
                  download={`drive-log-${log.id}-result.json`}
                >
                  Result JSON
                </a>
                <a
                  href={`/vehicles/${vehicle.id}/logs/${log.id}/result.csv`}
                  className={linkClass}
                  download
                >
                  Result CSV
                </a>
              </>
            ) : null}
            {summary && others.length ? (
              <CompareWith vehicleId={vehicle.id} logId={log.id} others={others} />
            ) : null}
          </div>
          {log.notes ? (
            <p className="mt-2 max-w-3xl text-sm text-neutral-700 whitespace-pre-line">
              Driver notes: {log.notes}
            </p>
          ) : null}
        </div>
      </header>
      <p role="status" aria-live="polite" className="sr-only">
        {progress.announcement}
      </p>
      {notice ? <Notice>{notice}</Notice> : null}
      {log.status === "failed" && log.error ? <Failure error={log.error} /> : null}
      {preview && !earlier && atLeast(role, "technician") ? (
        <Card title="Choose the columns" id="mapping">
          {applied ? (
            <p className="mb-4 text-sm text-neutral-700" data-columns-used={applied.source}>
              {columnsUsedText(applied)}
            </p>
          ) : null}
          <ColumnMapping
            preview={preview}
            current={mappingDefaults(applied)}
            lastResult={result && "map" in result ? result.map : undefined}
          />
        </Card>
      ) : applied ? (
        <p className="text-sm text-neutral-600" data-columns-used={applied.source}>
          {columnsUsedText(applied)}
        </p>
      ) : null}
      {isActive(progress.log.status) && !summary ? (
        <p className="text-sm text-neutral-600">
          The analysis summary appears here when the analysis has finished.
        </p>
      ) : null}
      {summary ? (
        <section aria-labelledby="analysis-title" className="space-y-4">
          <h2 id="analysis-title" className="text-lg font-semibold">
            Analysis{shown ? ` version ${shown.version}` : ""}
            {shown ? (
              <span className="ml-2 text-sm font-normal text-neutral-500">
                made <When date={shown.createdAt} />
              </span>
            ) : null}
          </h2>
          {earlier && latest ? (
            <EarlierVersionNote shown={earlier} latest={latest} logHref={logHref} />
          ) : null}
          {isActive(progress.log.status) && !earlier ? (
            <p className="text-sm text-neutral-600">
              A new analysis is running; these are the figures of the previous version.
            </p>
          ) : null}
          <AnalysisSummaryView
            s={summary}
            targets={verdicts}
            rattleHref={
              summary.rattle && !earlier
                ? `/vehicles/${vehicle.id}/logs/${log.id}/rattle`
                : undefined
            }
          />
        </section>
      ) : null}
      {summary ? (
        <DriveLogCharts
          chartsUrl={`${logHref}/charts.json${earlier ? `?analysis=${earlier.id}` : ""}`}
          analysisVersion={shown?.version}
          markers={markers}
          targets={bands}
          exportContext={{
            vehicle: `${vehicle.name} (${vehicle.identifier})`,
            driveLog: log.fileName,
          }}
        />
      ) : null}
      {summary ? <AnalysisDetails s={summary} /> : null}
      {atLeast(role, "engineer") && !earlier ? (
        <SharePanel endpoint={`/vehicles/${vehicle.id}/logs/${log.id}/share`} />
      ) : null}
      {atLeast(role, "engineer") &&
      !earlier &&
      log.status !== "queued" &&
      log.status !== "analysing" ? (
        <Card title="Re-analyse with other settings" id="reanalyse">
          <ReanalyseForm
            current={current}
            lastResult={result && "reanalyse" in result ? result.reanalyse : undefined}
          />
        </Card>
      ) : null}
      {versions.length > 1 ? (
        <AnalysisVersions versions={versions} shownId={shown?.id} logHref={logHref} />
      ) : null}
      {earlier ? null : <CommentsPanel vehicleId={vehicle.id} subject={`log:${log.id}`} />}
    </div>
  );
}

/** "Compare with…": pick another analysed drive log of the vehicle and open the comparison. */
function CompareWith({
  vehicleId,
  logId,
  others,
}: {
  vehicleId: number;
  logId: number;
  others: { id: number; label: string; fileName: string }[];
}) {
  return (
    <form
      method="get"
      action={`/vehicles/${vehicleId}/compare`}
      className="flex flex-wrap items-center gap-2"
    >
      <input type="hidden" name="logs" value={String(logId)} />
      <label htmlFor="compare-with" className="text-neutral-600">
        Compare with
      </label>
      <select
        id="compare-with"
        name="with"
        required
        className="max-w-64 rounded-md border border-neutral-300 px-2 py-1 text-sm sm:max-w-72"
        defaultValue=""
      >
        <option value="" disabled>
          choose a drive log…
        </option>
        {others.map((o) => (
          <option key={o.id} value={o.id}>
            {o.label} ({o.fileName})
          </option>
        ))}
      </select>
      <button
        type="submit"
        className="rounded-md border border-neutral-300 px-2 py-1 text-sm hover:bg-neutral-50"
      >
        Compare
      </button>
    </form>
  );
}

function Meta({ term, children }: { term: string; children: React.ReactNode }) {
  return (
    <div className="flex gap-1.5">
      <dt className="text-neutral-500">{term}</dt>
      <dd className="font-medium text-neutral-900">{children}</dd>
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
