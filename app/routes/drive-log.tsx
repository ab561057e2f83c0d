import { parseWithZod } from "@conform-to/zod/v4";
import { data, redirect, useActionData, useLoaderData } from "react-router";
import { AnalysisDetails } from "~/components/analysis-details";
import { AnalysisSection } from "~/components/analysis-section";
import { AnalysisVersions } from "~/components/analysis-versions";
import { ChannelsStep } from "~/components/channels-step";
import { FilePreview } from "~/components/column-mapping";
import { FileDetailsOffer } from "~/components/file-details-offer";
import { SourcePanel } from "~/components/source-panel";
import { DriveLogCharts } from "~/components/charts";
import { canChooseColumns, Failure } from "~/components/log-failure";
import { Breadcrumb } from "~/components/breadcrumb";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { DriveLogHeader } from "~/components/drive-log-header";
import { isActive, LogStatus } from "~/components/log-status";
import { useLiveStatus } from "~/components/use-log-progress";
import { Card, Notice } from "~/components/page";
import { ReanalyseForm, reanalyseSchema } from "~/components/reanalyse-form";
import { SharePanel } from "~/components/share-panel";
import { DeleteDriveLog } from "~/components/delete-drive-log";
import { clientIp } from "~/lib/http/request.server";
import { CommentsPanel, useCommentMarkers } from "~/components/comments-panel";
import { queueAnalysis } from "~/lib/analyses/requests.server";
import {
  chooseChannels,
  fileDetailsOffer,
  storedFormat,
  useFileDetails,
} from "~/lib/http/drive-log-channels.server";
import { channelChoiceSchema, choiceMapping } from "~/lib/domain/channel-names";
import { analysisParam } from "~/lib/http/analysis-param";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { logLabel } from "~/lib/data/curves.server";
import { conditionLabels } from "~/lib/domain/drive-log-terms";
import { summarise } from "~/lib/domain/analysis-summary";
import { idParam } from "~/lib/http/params";
import { atLeast } from "~/lib/domain/roles";
import { teamData } from "~/lib/data/team-data.server";
import { outOfScope } from "~/lib/domain/targets";
import { targetData, toTarget } from "~/lib/data/targets.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { readPreview } from "../lib/data/drive-log-preview.server";
import type { Route } from "./+types/drive-log";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid, NotFound } from "~/lib/domain/errors";

export const meta = ({ data }: Route.MetaArgs) => [
  { title: `${data?.log.fileName ?? "Drive log"} · Twistlog` },
];

async function load(
  request: Request,
  params: Route.LoaderArgs["params"],
  role: "viewer" | "technician" | "engineer",
) {
  const current = await requireAccess(request, role);
  const vehicles = vehicleData(current.team.id);
  const { vehicle, log } = await vehicles.vehicleLog(
    idParam(params.vehicleId),
    idParam(params.logId),
  );
  return { ...current, vehicles, vehicle, log };
}

export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team, vehicles, vehicle, log } = await load(request, params, "viewer");
  const versions = await vehicles.versions(log.id);
  // ?analysis=<id> shows an earlier version, read only; without it the latest, as always.
  const wanted = analysisParam(request);
  const chosen = wanted === undefined ? null : versions.find((v) => v.id === wanted);
  if (chosen === undefined) throw new NotFound("No such analysis version of this drive log.");
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
  const overColumns = !!error && canChooseColumns(error);
  // The first rows as text, beside the chooser, for a CSV whose columns failed.
  const mapping =
    overColumns && (await storedFormat(log.blobKey)) === "csv"
      ? await readPreview(log.blobKey)
      : null;
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
    // The "Starts and stops" panel: the version's events and the vehicle's end-stop limit.
    startStop: {
      events: result ? (result.events ?? null) : null,
      show: !!result && ((result.events?.length ?? 0) > 0 || log.condition === "start-stop"),
      travelLimitDeg: vehicle.damperTravelLimitDeg ?? null,
    },
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
    overColumns,
    applied,
    source: result?.source ?? null,
    fileDetails: fileDetailsOffer(result?.source, log),
  };
});

export const action = pageRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const form = await readForm(request);
  await assertCsrf(request, form);
  const intent = form.get("intent");
  if (intent === "map") {
    // Fixing the columns of an upload is the technician's own job (docs/architecture.md §2).
    const { team, vehicles, vehicle, log } = await load(request, params, "technician");
    return chooseChannels(team.id, vehicles, vehicle, log, form);
  }
  if (intent === "use-file-details") {
    // Whoever uploads drive logs (technicians and up) fills in their test details.
    const { vehicles, log } = await load(request, params, "technician");
    return useFileDetails(vehicles, log);
  }
  if (intent === "delete-log") {
    // Deleting a drive log is the engineer's (issue 16); it asks first: without confirm=yes the
    // page comes back with the question, and nothing changes.
    const { user, vehicles, vehicle, log } = await load(request, params, "engineer");
    if (form.get("confirm") !== "yes") return { confirmDeleteLog: true };
    await vehicles.removeLog(log.id, { ...user, ip: clientIp(context) });
    return redirect(`/vehicles/${vehicle.id}?notice=log-deleted`);
  }
  if (intent !== "reanalyse") throw new Invalid("Unknown action.");
  const { vehicles, log } = await load(request, params, "engineer");
  const submission = parseWithZod(form, { schema: reanalyseSchema });
  if (submission.status !== "success")
    return data({ reanalyse: submission.reply() }, { status: 400 });
  const { intent: _, ...overrides } = submission.value;
  // Optional channels (timeChannel, crankChannel, gearboxChannel, crankUnit, gearboxUnit).
  const choice = channelChoiceSchema.safeParse(Object.fromEntries(form));
  if (!choice.success) {
    const issue = choice.error.issues[0]!;
    throw new Invalid(`${issue.path.join(".")}: ${issue.message}`);
  }
  const channels = choiceMapping(choice.data) ?? undefined;
  await queueAnalysis(await vehicles.reanalysisJob(log.id, overrides, channels));
  return { notice: "A new analysis version is queued; the earlier ones are kept." };
});

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
    overColumns,
    applied,
    source,
    fileDetails,
    startStop,
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
      <DriveLogHeader
        vehicle={vehicle}
        log={log}
        status={<LogStatus log={progress.log} label={log.fileName} />}
        downloads={!!summary && !earlier}
        others={summary ? others : []}
      />
      <p role="status" aria-live="polite" className="sr-only">
        {progress.announcement}
      </p>
      {notice ? <Notice>{notice}</Notice> : null}
      {log.status === "failed" && log.error ? <Failure error={log.error} /> : null}
      {!earlier && atLeast(role, "technician") ? <FileDetailsOffer {...fileDetails} /> : null}
      <ChannelsStep
        vehicleId={vehicle.id}
        logId={log.id}
        offer={!earlier && atLeast(role, "technician")}
        failedOverColumns={overColumns}
        settled={!isActive(progress.log.status)}
        applied={applied}
        lastResult={result && "map" in result ? result.map : undefined}
      />
      {preview && overColumns && !earlier && atLeast(role, "technician") ? (
        <FilePreview preview={preview} />
      ) : null}
      {isActive(progress.log.status) && !summary ? (
        <p className="text-sm text-neutral-600">
          The analysis summary appears here when the analysis has finished.
        </p>
      ) : null}
      {summary ? (
        <AnalysisSection
          summary={summary}
          verdicts={verdicts}
          shown={shown}
          earlier={earlier}
          latest={latest}
          logHref={logHref}
          rattleHref={`${logHref}/rattle`}
          running={isActive(progress.log.status)}
          startStop={{
            ...startStop,
            editHref: atLeast(role, "engineer") ? `/vehicles/${vehicle.id}/edit` : undefined,
          }}
        />
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
      {summary ? <AnalysisDetails s={summary} team={shown?.team ?? null} /> : null}
      {source ? <SourcePanel source={source} /> : null}
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
      {atLeast(role, "engineer") && !earlier ? (
        <DeleteDriveLog
          logHref={logHref}
          fileName={log.fileName}
          asked={!!result && "confirmDeleteLog" in result}
        />
      ) : null}
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
