import { data } from "react-router";
import { summarise } from "~/lib/domain/analysis-summary";
import { compareIsolation } from "../domain/comparison";
import { comparisonLogs } from "../data/comparison.server";
import { curvesForLogs } from "../data/curves.server";
import { damperLabels, transmissionLabels } from "../domain/drive-log-terms";
import { vehicleFiringOrder } from "../domain/vehicle-firing-order";
import { NOT_FOUND_MESSAGE, UNAVAILABLE_MESSAGE } from "../domain/share-schema";
import { resolveShare, sharedLogIds, type ResolvedShare } from "../data/shares.server";
import { teamData } from "../data/team-data.server";
import { apiError } from "./edge.server";
import { vehicleData, type DriveLogRow } from "../data/vehicles.server";
import { signoffData } from "../data/signoffs.server";
import { signoffView } from "./signoff-pages.server";

/**
 * What every answer under /s/:token carries: the URL holds a secret, so it must not leave in a
 * Referer (W3C Referrer Policy, "no-referrer"), sit in a shared or browser cache (RFC 9111
 * §5.2.2.5 no-store) or be indexed by a search engine (X-Robots-Tag, as the big crawlers
 * document it).
 */
export const shareHeaders = {
  "Referrer-Policy": "no-referrer",
  "Cache-Control": "no-store",
  "X-Robots-Tag": "noindex, nofollow",
} as const;

export type ActiveShare = Extract<ResolvedShare, { status: "ok" }>;

/** For the page: the active share, or a thrown 404 / 410 that carries nothing of the data. */
export async function requireShareForPage(token: string | undefined): Promise<ActiveShare> {
  const resolved = await resolveShare(token);
  if (resolved.status === "not-found")
    throw data(NOT_FOUND_MESSAGE, { status: 404, headers: shareHeaders });
  if (resolved.status === "unavailable")
    throw data(UNAVAILABLE_MESSAGE, { status: 410, headers: shareHeaders });
  return resolved;
}

/** The API's error shape (apiError) with the share link's headers. */
export function shareJsonError(status: number, code: string, message: string): Response {
  const answer = apiError(status, code, message);
  for (const [name, value] of Object.entries(shareHeaders)) answer.headers.set(name, value);
  return answer;
}

/** For the JSON routes: the active share, or the 404 / 410 JSON answer to return. */
export async function shareForJson(token: string | undefined): Promise<ActiveShare | Response> {
  const resolved = await resolveShare(token);
  if (resolved.status === "not-found") return shareJsonError(404, "not_found", NOT_FOUND_MESSAGE);
  if (resolved.status === "unavailable")
    return shareJsonError(410, "share_unavailable", UNAVAILABLE_MESSAGE);
  return resolved;
}

/**
 * One drive-log id from `?log=` that the share opens (its own log when absent), or null when
 * the id is not one of the share's: a share link never reaches another drive log.
 */
function sharedLogFromQuery(share: ActiveShare["share"], value: string | null): number | null {
  const ids = sharedLogIds(share);
  if (value === null || value === "") return ids[0] ?? null;
  if (!/^\d{1,15}$/.test(value)) return null;
  const id = Number(value);
  return ids.includes(id) ? id : null;
}

/**
 * The drive log a share link's JSON route is asked for (`?log=ID`, default its first): the row,
 * or a 404 answer when the id is not one of the share's drive logs.
 */
export async function sharedLogFor(
  active: ActiveShare,
  request: Request,
): Promise<DriveLogRow | Response> {
  const logId = sharedLogFromQuery(active.share, new URL(request.url).searchParams.get("log"));
  const missing = () =>
    shareJsonError(404, "not_found", "That drive log is not part of this share link.");
  if (logId === null) return missing();
  const log = await vehicleData(active.teamId).log(logId);
  return log.vehicleId === active.share.vehicleId ? log : missing();
}

/** Everything the shared page shows, and nothing else of the team (no ids of other records). */
export async function sharedPageData(active: ActiveShare) {
  const { share, teamId } = active;
  const vehicles = vehicleData(teamId);
  const [team, vehicle] = await Promise.all([
    teamData(teamId).team(),
    vehicles.vehicle(share.vehicleId),
  ]);
  const ids = sharedLogIds(share);
  const logs = await Promise.all(
    ids.map(async (id) => {
      const log = await vehicles.log(id);
      const analysis = log.latestAnalysisId ? await vehicles.latestAnalysis(log.id) : null;
      return {
        id: log.id,
        fileName: log.fileName,
        condition: log.condition,
        gear: log.gear,
        damperVariant: log.damperVariant,
        testDate: log.testDate,
        status: log.status,
        analysis: analysis
          ? { version: analysis.version, createdAt: analysis.createdAt.toISOString() }
          : null,
        summary: analysis ? summarise(analysis.result, vehicle.idleRpm) : null,
      };
    }),
  );
  let signoff = null;
  if (share.kind === "signoff" && share.signoffId) {
    // The sign-off's frozen evidence only: names, never addresses (signoffView).
    const signoffs = signoffData(teamId);
    const [json, { record }] = await Promise.all([
      signoffs.get(share.signoffId),
      signoffs.record(share.signoffId),
    ]);
    signoff = signoffView(json, record);
  }
  let comparison = null;
  if (share.kind === "comparison") {
    const { logs: compared, referenceNote } = await comparisonLogs(vehicles, vehicle, ids);
    const curves = await curvesForLogs(teamId, vehicle.id, ids);
    comparison = {
      logs: compared,
      referenceNote,
      result: compareIsolation(
        compared
          .filter((l) => l.analysed)
          .flatMap((l) => {
            const c = curves.find((x) => x.logId === l.id);
            return c
              ? [{ logId: l.id, name: l.name, rpm: c.isolation.rpm, dB: c.isolation.dB }]
              : [];
          }),
      ),
    };
  }
  return {
    kind: share.kind,
    sharedBy: active.sharedBy,
    teamName: team.name,
    sharedAt: share.createdAt.toISOString(),
    expiresAt: share.expiresAt.toISOString(),
    note: share.note,
    allowRawDownload: share.allowRawDownload,
    vehicle: {
      name: vehicle.name,
      identifier: vehicle.identifier,
      engine: `${vehicle.cylinders} cylinders, ${vehicle.stroke === 2 ? "two" : "four"}-stroke, ${vehicle.fuel}; idle ${vehicle.idleRpm} rpm`,
      firingOrder: vehicleFiringOrder(vehicle),
      transmission: transmissionLabels[vehicle.transmissionType],
      damper: damperLabels[vehicle.damperType],
      damperVariant: vehicle.damperVariant,
      rattleLimitRadS2: vehicle.rattleLimitRadS2,
    },
    logs,
    comparison,
    signoff,
  };
}
