import { parseWithZod } from "@conform-to/zod/v4";
import { useMemo } from "react";
import {
  data,
  redirect,
  useActionData,
  useLoaderData,
  useRevalidator,
  type ShouldRevalidateFunctionArgs,
} from "react-router";
import { VerdictCaution } from "~/components/caution-note";
import { Breadcrumb } from "~/components/breadcrumb";
import { DamperHealthCard } from "~/components/damper-health-card";
import { GeneralErrorBoundary } from "~/components/error-boundary";
import { DriveLogTable, TABLE_PARAMS, type DriveLogTableRow } from "~/components/drive-log-table";
import { LatestCurves, useCurvesRefresh } from "~/components/latest-curves";
import type { LogProgress } from "~/components/log-status";
import { Card, Notice } from "~/components/page";
import { TargetsCard, type TargetFormReply, type TargetSummary } from "~/components/targets-card";
import { UploadCard } from "~/components/upload-card";
import { ProgressNotes, UploadNotices } from "~/components/upload-notices";
import { ReanalyseAllPanel } from "~/components/reanalyse-all";
import { useLogProgress } from "~/components/use-log-progress";
import { VehicleCard } from "~/components/vehicle-card";
import { SignoffCard } from "~/components/signoff-card";
import { signoffCardData } from "~/lib/http/signoff-pages.server";
import { VehicleHeading } from "~/components/vehicle-heading";
import { audit } from "~/lib/data/audit.server";
import { assertCsrf } from "~/lib/http/csrf.server";
import { readForm } from "~/lib/http/forms.server";
import { idParam } from "~/lib/http/params";
import { clientIp } from "~/lib/http/request.server";
import { atLeast, canReanalyseAll } from "~/lib/domain/roles";
import { vehicleFiringOrder } from "~/lib/domain/vehicle-firing-order";
import type { TargetVerdict } from "~/lib/domain/targets";
import { targetSchema } from "~/lib/domain/target-schema";
import { limitText, marginText, scopeText } from "~/lib/domain/target-text";
import { targetData, toTarget } from "~/lib/data/targets.server";
import { vehicleData } from "~/lib/data/vehicles.server";
import { loadVehicleTrend } from "~/lib/data/trend.server";
import type { Route } from "./+types/vehicle";
import { uploadFromForm } from "../lib/http/form-upload.server";
import { requireAccess } from "~/lib/http/access.server";
import { pageRoute } from "~/lib/http/edge.server";
import { Invalid, NotFound } from "~/lib/domain/errors";

export const meta = ({ data }: Route.MetaArgs) => [
  { title: `${data?.vehicle.identifier ?? "Vehicle"} · Twistlog` },
];

export const loader = pageRoute(async ({ request, params }: Route.LoaderArgs) => {
  const { team, user } = await requireAccess(request, "viewer");
  const vehicles = vehicleData(team.id);
  const targets = targetData(team.id);
  const vehicle = await vehicles.vehicle(idParam(params.vehicleId));
  const search = new URL(request.url).searchParams;
  // "Compare selected" without JavaScript posts ?compare=1&logs=3&logs=5: on to the comparison.
  if (search.has("compare")) {
    const ids = search.getAll("logs").filter((s) => /^\d{1,15}$/.test(s));
    throw redirect(`/vehicles/${vehicle.id}/compare?logs=${ids.join(",")}`);
  }
  const [logs, targetRows, trend, signoff] = await Promise.all([
    vehicles.logsWithSummary(vehicle.id),
    targets.list(vehicle.id),
    loadVehicleTrend(team.id, vehicle.id),
    signoffCardData(team.id, vehicle.id, { userId: user.id, role: team.role }),
  ]);
  const idle = logs.filter((l) => l.latestAnalysisId !== null && l.idleAngAccelRadS2 !== null);
  const [verdicts, idleFigures] = await Promise.all([
    targets.verdictsForLogs(vehicle.id, logs, targetRows),
    targets.idleFigures(idle.map((l) => l.latestAnalysisId!)),
  ]);
  const rows: DriveLogTableRow[] = logs.map((l) => {
    const done = l.latestAnalysisId !== null && l.firingOrder !== null;
    const judged = verdicts.get(l.id);
    const amp = l.idleAngAccelRadS2;
    return {
      id: l.id,
      fileName: l.fileName,
      condition: l.condition,
      gear: l.gear,
      damperVariant: l.damperVariant,
      date: l.testDate ?? l.uploadedAt.toISOString().slice(0, 10),
      dateIsUpload: l.testDate === null,
      uploadedAt: l.uploadedAt.toISOString(),
      status: l.status,
      progress: l.status === "done" ? 1 : l.progress,
      stage: l.stage,
      problem: l.status === "failed" && l.error ? l.error.message : null,
      isolation: done
        ? { minDb: l.isolationMinDb, maxDb: l.isolationMaxDb, rpmMin: l.rpmMin, rpmMax: l.rpmMax }
        : null,
      // The same figure the rattle verdict compares with the limit: the larger of the two.
      rattle:
        done && l.rattleVerdict && amp !== null
          ? {
              verdict: l.rattleVerdict,
              valueRadS2: Math.max(amp, idleFigures.get(l.latestAnalysisId!)?.peakRadS2 ?? amp),
            }
          : null,
      targets: judged ? verdictCounts(judged) : null,
    };
  });
  const summaries: TargetSummary[] = targetRows.map((row) => {
    const mine = [...verdicts.values()].flatMap((vs) => vs.filter((v) => v.targetId === row.id));
    const count = (status: TargetVerdict["status"]) =>
      mine.filter((v) => v.status === status).length;
    const counts = {
      passed: count("pass"),
      failed: count("fail"),
      notCovered: count("not-covered"),
    };
    // The newest upload with a pass or fail (else the newest it applies to); rows are newest first.
    const judged = logs
      .map((l) => ({ log: l, verdict: verdicts.get(l.id)?.find((v) => v.targetId === row.id) }))
      .filter((x) => x.verdict && x.verdict.status !== "not-applicable");
    const newest =
      judged.find((x) => x.verdict!.status === "pass" || x.verdict!.status === "fail") ?? judged[0];
    return {
      ...toTarget(row),
      counts: { ...counts, applicable: counts.passed + counts.failed + counts.notCovered },
      latest: newest
        ? { logId: newest.log.id, fileName: newest.log.fileName, verdict: newest.verdict! }
        : null,
    };
  });
  return {
    role: team.role,
    vehicle: {
      ...vehicle,
      archived: vehicle.archivedAt !== null,
      firingOrder: vehicleFiringOrder(vehicle) ?? vehicle.cylinders / 2,
    },
    logs: rows,
    targets: summaries,
    analysedLogs: verdicts.size,
    trend,
    signoff,
    // After a form upload without JavaScript: ?uploaded=12,13&dup=13-7 (log 13 repeats log 7).
    uploaded: (search.get("uploaded") ?? "")
      .split(",")
      .filter((s) => /^\d+$/.test(s))
      .map(Number),
    duplicates: (search.get("dup") ?? "")
      .split(",")
      .map((pair) => pair.split("-").map(Number))
      .filter(
        (p): p is [number, number] =>
          p.length === 2 && p.every((n) => Number.isSafeInteger(n) && n > 0),
      ),
    notice: noticeOf(search.get("notice")),
  };
});

function noticeOf(code: string | null): string | null {
  if (code === "saved") return "The vehicle is saved.";
  if (code === "log-deleted")
    return "The drive log is deleted. Sign-offs that rested on it are marked superseded.";
  return null;
}

function verdictCounts(verdicts: TargetVerdict[]): NonNullable<DriveLogTableRow["targets"]> {
  return {
    passed: verdicts.filter((v) => v.status === "pass").length,
    failed: verdicts.filter((v) => v.status === "fail").length,
    notCovered: verdicts.filter((v) => v.status === "not-covered").length,
    failedNames: verdicts
      .filter((v) => v.status === "fail")
      .map((v) => `${v.name} (${marginText(v)})`),
  };
}

/** Changing the drive-log table's sort, filters or page only rewrites the URL: no new load. */
export function shouldRevalidate({
  currentUrl,
  nextUrl,
  formMethod,
  defaultShouldRevalidate,
}: ShouldRevalidateFunctionArgs) {
  if (
    formMethod ||
    currentUrl.pathname !== nextUrl.pathname ||
    currentUrl.search === nextUrl.search
  )
    return defaultShouldRevalidate;
  const rest = (url: URL) => {
    const p = new URLSearchParams(url.search);
    for (const k of TABLE_PARAMS) p.delete(k);
    p.sort();
    return p.toString();
  };
  return rest(currentUrl) === rest(nextUrl) ? false : defaultShouldRevalidate;
}

const TARGET_INTENTS = ["create-target", "update-target", "delete-target"];

export const action = pageRoute(async ({ request, params, context }: Route.ActionArgs) => {
  const type = request.headers.get("content-type") ?? "";
  if (type.toLowerCase().startsWith("multipart/form-data"))
    return uploadFromForm(request, params.vehicleId);
  const form = await readForm(request);
  await assertCsrf(request, form);
  const intent = form.get("intent");
  // Vehicles and their targets are the engineer's (docs/architecture.md §2): 403 for technicians and viewers.
  const { team, user } = await requireAccess(request, "engineer");
  const vehicles = vehicleData(team.id);
  const vehicle = await vehicles.vehicle(idParam(params.vehicleId));
  const ip = clientIp(context);
  const actor = { id: user.id, email: user.email };
  if (typeof intent === "string" && TARGET_INTENTS.includes(intent)) {
    const targets = targetData(team.id);
    let existing = null;
    if (intent !== "create-target") {
      const id = Number(form.get("targetId"));
      if (!(Number.isSafeInteger(id) && id > 0)) throw new NotFound("No such target.");
      existing = await targets.get(id);
      if (existing.vehicleId !== vehicle.id) throw new NotFound("No such target for this vehicle.");
    }
    if (intent === "delete-target" && existing) {
      // Deleting asks first: without confirm=yes (the delete button without JavaScript) the
      // page comes back with the question for this target, and nothing changes.
      if (form.get("confirm") !== "yes") return { confirmDelete: existing.id };
      await targets.remove(existing.id, { ...actor, name: user.name, ip });
      await audit({
        teamId: team.id,
        actor,
        action: "target-deleted",
        detail: `${vehicle.identifier}: target ${existing.id} “${existing.name}”`,
        ip,
      });
      return { notice: `The target “${existing.name}” is deleted.` };
    }
    const formId = existing ? `target-${existing.id}` : "target-new";
    const submission = parseWithZod(form, { schema: targetSchema });
    if (submission.status !== "success") {
      const reply: TargetFormReply = { form: formId, result: submission.reply() };
      return data({ targetForm: reply }, { status: 400 });
    }
    const input = submission.value;
    const id = existing
      ? (await targets.update(existing.id, input, { ...actor, name: user.name, ip }), existing.id)
      : await targets.create(vehicle.id, input, user.id);
    await audit({
      teamId: team.id,
      actor,
      action: existing ? "target-changed" : "target-created",
      detail: `${vehicle.identifier}: target ${id} “${input.name}”, ${limitText(input)}; ${scopeText(input)}`,
      ip,
    });
    const reply: TargetFormReply = {
      form: formId,
      result: submission.reply({ resetForm: !existing }),
    };
    return {
      notice: existing
        ? `The target “${input.name}” is saved; every drive log is judged against it again.`
        : `The target “${input.name}” is added; every analysed drive log is judged against it.`,
      targetForm: reply,
    };
  }
  if (!(intent === "archive" || intent === "restore")) throw new Invalid("Unknown action.");
  await vehicles.setArchived(vehicle.id, intent === "archive");
  await audit({
    teamId: team.id,
    actor,
    action: intent === "archive" ? "vehicle-archived" : "vehicle-restored",
    detail: `vehicle ${vehicle.id} (${vehicle.identifier})`,
    ip,
  });
  return {
    notice:
      intent === "archive"
        ? "The vehicle is archived: it is hidden from the list and takes no new drive logs. Its results stay."
        : "The vehicle is restored.",
  };
});

export default function VehiclePage() {
  const {
    role,
    vehicle,
    logs,
    targets,
    analysedLogs,
    trend,
    signoff,
    uploaded,
    duplicates,
    notice,
  } = useLoaderData<typeof loader>();
  const result = useActionData<typeof action>();
  const revalidator = useRevalidator();
  const progress: LogProgress[] = useMemo(
    () => logs.map(({ id, status, progress, stage }) => ({ id, status, progress, stage })),
    [logs],
  );
  const names = useMemo(() => new Map(logs.map((l) => [l.id, l.fileName])), [logs]);
  const { statuses, announcement } = useLogProgress(vehicle.id, progress, names);
  useCurvesRefresh(logs);
  const engineer = atLeast(role, "engineer");
  const actionNotice = result && "notice" in result ? result.notice : null;
  const uploadError = result && "uploadError" in result ? result.uploadError : null;
  const targetReply = result && "targetForm" in result ? (result.targetForm ?? null) : null;
  const confirmDelete = result && "confirmDelete" in result ? result.confirmDelete : null;

  return (
    <div className="space-y-6">
      <Breadcrumb trail={[{ label: "Vehicles", to: "/vehicles" }, { label: vehicle.identifier }]} />
      <VehicleHeading vehicle={vehicle} engineer={engineer} />
      {notice ? <Notice>{notice}</Notice> : null}
      {actionNotice ? <Notice>{actionNotice}</Notice> : null}
      <UploadNotices vehicleId={vehicle.id} uploaded={uploaded} duplicates={duplicates} />
      <VehicleCard vehicle={vehicle} />
      <ProgressNotes
        vehicleId={vehicle.id}
        announcement={announcement}
        running={logs.some((l) => l.status === "queued" || l.status === "analysing")}
      />
      <div className="grid gap-6 xl:grid-cols-2">
        <TargetsCard
          vehicleId={vehicle.id}
          targets={targets}
          canEdit={engineer}
          reply={targetReply}
          confirmDelete={confirmDelete}
          analysedLogs={analysedLogs}
          rattleLimitRadS2={vehicle.rattleLimitRadS2}
          damperTravelLimitDeg={vehicle.damperTravelLimitDeg}
        />
        <LatestCurves vehicle={vehicle} analysedLogs={analysedLogs} />
      </div>
      <SignoffCard vehicleId={vehicle.id} {...signoff} />
      <DamperHealthCard trend={trend} vehicleId={vehicle.id} />
      <Card title="Drive logs" id="drive-logs">
        <DriveLogTable
          vehicleId={vehicle.id}
          vehicleIdentifier={vehicle.identifier}
          rows={logs}
          statuses={statuses}
          hasTargets={targets.length > 0}
          canUpload={atLeast(role, "technician") && !vehicle.archived}
        />
        {analysedLogs > 0 ? (
          <div className="mt-4">
            <VerdictCaution />
          </div>
        ) : null}
      </Card>
      {canReanalyseAll(role) ? (
        <ReanalyseAllPanel vehicleId={vehicle.id} logs={logs} firingOrder={vehicle.firingOrder} />
      ) : null}
      {atLeast(role, "technician") && !vehicle.archived ? (
        <UploadCard
          vehicle={vehicle}
          statuses={statuses}
          uploadError={uploadError}
          onUploaded={() => void revalidator.revalidate()}
        />
      ) : null}
    </div>
  );
}

export function ErrorBoundary() {
  return <GeneralErrorBoundary />;
}
